package archive

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
)

// sizeUnits are the accepted size suffixes, lower case: the SI decimal
// prefixes (kB = 1000 bytes) and the IEC binary ones (KiB = 1024 bytes),
// as IEC 80000-13 defines them.
var sizeUnits = map[string]int64{
	"": 1, "b": 1, "byte": 1, "bytes": 1,
	"kb": 1e3, "mb": 1e6, "gb": 1e9, "tb": 1e12,
	"kib": 1 << 10, "mib": 1 << 20, "gib": 1 << 30, "tib": 1 << 40,
}

// ParseSize reads a size in bytes: a plain number of bytes ("1048576") or
// a number with a unit, decimal (kB, MB, GB, TB) or binary (KiB, MiB, GiB,
// TiB), case-insensitive, optionally with a fraction ("1.5GiB"); fractions
// of a byte are dropped. The size must be at least one byte.
func ParseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	i := strings.IndexFunc(t, func(r rune) bool { return (r < '0' || r > '9') && r != '.' })
	if i < 0 {
		i = len(t)
	}
	num, unit := t[:i], strings.ToLower(strings.TrimSpace(t[i:]))
	mult, ok := sizeUnits[unit]
	if !ok {
		return 0, fmt.Errorf("size %q: unknown unit %q (use bytes, kB, MB, GB, TB, KiB, MiB, GiB or TiB)", s, t[i:])
	}
	if num == "" || strings.Count(num, ".") > 1 || num == "." {
		return 0, fmt.Errorf("size %q: not a number of bytes", s)
	}
	r, ok := new(big.Rat).SetString(num)
	if !ok {
		return 0, fmt.Errorf("size %q: not a number of bytes", s)
	}
	r.Mul(r, new(big.Rat).SetInt64(mult))
	n := new(big.Int).Quo(r.Num(), r.Denom())
	if !n.IsInt64() {
		return 0, fmt.Errorf("size %q: more than %d bytes", s, int64(math.MaxInt64))
	}
	if n.Int64() < 1 {
		return 0, errors.New("size " + strconv.Quote(s) + ": must be at least 1 byte")
	}
	return n.Int64(), nil
}

// FormatSize writes a size in the largest binary unit it reaches, with
// up to one decimal ("4 GiB", "2.5 MiB", "512 bytes").
func FormatSize(n int64) string {
	units := []string{"KiB", "MiB", "GiB", "TiB", "PiB", "EiB"}
	if n < 1024 {
		return strconv.FormatInt(n, 10) + " bytes"
	}
	v, u := float64(n)/1024, 0
	for v >= 1024 && u < len(units)-1 {
		v /= 1024
		u++
	}
	return strconv.FormatFloat(math.Floor(v*10)/10, 'f', -1, 64) + " " + units[u]
}
