package expr

import (
	"strconv"
	"strings"
)

// Precedence levels of the printer, loosest first.
const (
	levelSum   = 1 // + -
	levelProd  = 2 // * /
	levelUnary = 3 // -u
	levelPow   = 4 // ^
	levelAtom  = 5 // literals, names, calls
)

func level(t *ast) int {
	switch t.kind {
	case aAdd, aSub:
		return levelSum
	case aMul, aDiv:
		return levelProd
	case aNeg:
		return levelUnary
	case aPow:
		return levelPow
	}
	return levelAtom
}

// render renders the syntax tree as canonical source text. Parentheses
// appear exactly where the grammar needs them to rebuild the same tree,
// including around a right operand of the same precedence ("a - (b - c)",
// "a + (b + c)"): floating-point addition is not associative, so the tree
// is kept as written.
func render(t *ast) string {
	var b strings.Builder
	write(&b, t, levelSum)
	return b.String()
}

// write renders t, in parentheses if it binds more loosely than minLevel.
func write(b *strings.Builder, t *ast, minLevel int) {
	if level(t) < minLevel {
		b.WriteByte('(')
		defer b.WriteByte(')')
	}
	switch t.kind {
	case aNum:
		b.WriteString(formatNum(t.val))
	case aField, aParam, aConst:
		b.WriteString(t.name)
	case aNeg:
		b.WriteByte('-')
		write(b, t.args[0], levelUnary)
	case aAdd, aSub, aMul, aDiv:
		lv := level(t)
		write(b, t.args[0], lv)
		b.WriteString([...]string{aAdd: " + ", aSub: " - ", aMul: " * ", aDiv: " / "}[t.kind])
		write(b, t.args[1], lv+1)
	case aPow:
		write(b, t.args[0], levelAtom)
		b.WriteByte('^')
		write(b, t.args[1], levelUnary)
	case aCall:
		b.WriteString(t.fn.name)
		b.WriteByte('(')
		for i, a := range t.args {
			if i > 0 {
				b.WriteString(", ")
			}
			write(b, a, levelSum)
		}
		b.WriteByte(')')
	}
}

// formatNum writes a float in the shortest form that reads back to the
// same value.
func formatNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
