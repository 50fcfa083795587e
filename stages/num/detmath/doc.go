// Package detmath is the elementary and special functions of the
// numerics, computed to the same bits on every build: any architecture,
// any GOAMD64 level, any CPU.
//
// Go's math package does not promise that. The Go specification lets a
// compiler fuse x*y + z into one multiply-add with a single rounding, and
// gc does so on arm64, ppc64le, s390x, riscv64 and amd64 with GOAMD64=v3,
// inside math's own pure-Go code as in ours. On amd64 math.Exp is assembly
// that switches to fused instructions at run time when the CPU has them,
// so even one binary gives different bits on two machines. Either way the
// output hashes of the ledger change, and shards computed on different
// machines no longer merge.
//
// The files here are Go 1.26's math sources (BSD licence, LICENSE-go; each
// file keeps its copyright line) with the assembly dispatch removed and
// every float64 product rounded explicitly (x*y written float64(x*y)),
// which the specification defines to prevent fusion ("Arithmetic
// operators": an explicit floating-point type conversion rounds to the
// precision of the target type). The rewrite is mechanical:
// gen/roundmul.go. Built without fusion (GOAMD64=v1 on amd64) every
// function here returns the bits of math's pure-Go implementation; Exp,
// Log and Hypot, assembly on amd64 in math, agree with it to 1 ulp
// (detmath_test.go).
//
// The exact functions (Sqrt, Abs, Floor, Frexp, Ldexp, Modf, Mod,
// Copysign) are correctly rounded or exact by IEEE 754 and are taken from
// math. .ci/nofma.sh compiles the numerics for every fusing target and
// fails on any fused instruction.
package detmath
