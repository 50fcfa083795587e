package tables

import (
	"math"
	"strconv"
	"strings"
)

// DefaultDigits is the number of significant digits when Options gives
// neither Digits nor Exact.
const DefaultDigits = 4

// numberFormat says how numbers are written: to digits significant
// figures, or exactly (shortest decimal that reads back to the same
// float64, strconv's 'g' -1) when digits is 0.
type numberFormat struct{ digits int }

// machine writes x for CSV and JSON: the shortest decimal of x rounded to
// the significant digits (trailing zeros dropped), or of x itself when
// exact, in Go's 'g' layout ("0.9649", "2.48e+13"; valid JSON numbers).
// Non-finite values give "NaN", "+Inf", "-Inf".
func (f numberFormat) machine(x float64) string {
	if f.digits > 0 && !math.IsNaN(x) && !math.IsInf(x, 0) {
		x, _ = strconv.ParseFloat(strconv.FormatFloat(x, 'e', f.digits-1, 64), 64)
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// parts splits x into a decimal mantissa and exponent: to the significant
// digits with trailing zeros kept, or the shortest exact digits. fixed is
// the positional form when the decimal exponent e satisfies -3 <= e <
// digits (e < 6 when exact), the range in which it is no longer than the
// scientific one (common practice, as printf's %g with a lower cut of
// 1e-3 rather than 1e-4).
func (f numberFormat) parts(x float64) (fixed string, mant string, exp int, useFixed bool) {
	prec := f.digits - 1
	if f.digits == 0 {
		prec = -1
	}
	e := strconv.FormatFloat(x, 'e', prec, 64)
	i := strings.IndexByte(e, 'e')
	mant = e[:i]
	exp, _ = strconv.Atoi(e[i+1:])
	limit := f.digits
	if f.digits == 0 {
		limit = 6
	}
	if exp >= -3 && exp < limit {
		if f.digits == 0 {
			return strconv.FormatFloat(x, 'f', -1, 64), mant, exp, true
		}
		return strconv.FormatFloat(x, 'f', max(f.digits-1-exp, 0), 64), mant, exp, true
	}
	return "", mant, exp, false
}

// plain writes x for Markdown: positional ("0.9649", "60.00") or
// scientific with an exponent ("2.481e+13").
func (f numberFormat) plain(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	fixed, mant, exp, ok := f.parts(x)
	if ok {
		return fixed
	}
	sign := "+"
	if exp < 0 {
		sign, exp = "-", -exp
	}
	return mant + "e" + sign + strconv.Itoa(exp)
}

// latex writes x in math mode: $0.9649$, $2.481\times10^{13}$,
// $+\infty$; NaN as text.
func (f numberFormat) latex(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return `$+\infty$`
	case math.IsInf(x, -1):
		return `$-\infty$`
	}
	fixed, mant, exp, ok := f.parts(x)
	if ok {
		return "$" + fixed + "$"
	}
	return "$" + mant + `\times10^{` + strconv.Itoa(exp) + "}$"
}

// notations chooses, for each column of computed numbers, one notation
// for all its cells (one notation per column, as journal tables print
// them: common practice): scientific when any of its finite non-zero
// values lies outside the positional range of parts, else positional.
// Other columns are false.
func (sh *sheet) notations(nf numberFormat) []bool {
	sci := make([]bool, len(sh.cols))
	for i, c := range sh.cols {
		if c.kind != number {
			continue
		}
		for _, row := range sh.rows {
			v := sh.value(c, row)
			if !v.ok || v.num == 0 || math.IsNaN(v.num) || math.IsInf(v.num, 0) {
				continue
			}
			if _, _, _, fixed := nf.parts(v.num); !fixed {
				sci[i] = true
				break
			}
		}
	}
	return sci
}

// split writes a finite x in the given notation: the positional digits,
// or the mantissa and decimal exponent.
func (f numberFormat) split(x float64, sci bool) (mant string, exp int) {
	fixed, mant, exp, _ := f.parts(x)
	if !sci {
		if fixed == "" { // outside the positional range: only for x = 0, which parts keeps positional
			fixed = strconv.FormatFloat(x, 'f', -1, 64)
		}
		return fixed, 0
	}
	return mant, exp
}

// plainIn writes x for Markdown in the column's notation: "0.9649", or
// "2.481e+13", "-6.612e-4".
func (f numberFormat) plainIn(x float64, sci bool) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return f.plain(x)
	}
	mant, exp := f.split(x, sci)
	if !sci {
		return mant
	}
	sign := "+"
	if exp < 0 {
		sign, exp = "-", -exp
	}
	return mant + "e" + sign + strconv.Itoa(exp)
}

// siunitx writes a finite x as input to a siunitx S column in the
// column's notation: "0.9649", "-6.612e-4" (siunitx manual, Wright 2023,
// section "Parsing numbers": an optional sign, digits with a decimal
// marker, an exponent after e).
func (f numberFormat) siunitx(x float64, sci bool) string {
	mant, exp := f.split(x, sci)
	if !sci {
		return mant
	}
	return mant + "e" + strconv.Itoa(exp)
}
