package detmath

// The layout of an IEEE 754 binary64 number (as in Go's math/bits.go).
const (
	mask  = 0x7FF
	shift = 64 - 11 - 1
	bias  = 1023
)
