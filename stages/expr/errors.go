package expr

import (
	"fmt"
	"strings"
)

// Code classifies a SyntaxError so callers can branch on the kind of
// problem without matching message text.
type Code int

// The error classes. Every error Compile returns for a problem in the
// source text is a *SyntaxError carrying one of these.
const (
	// CodeEmpty: the source is empty or only white space.
	CodeEmpty Code = iota + 1
	// CodeBadChar: a character that starts no token, such as '$' or '²'.
	CodeBadChar
	// CodeBadNumber: a malformed numeric literal ("1e", "."), or one that
	// overflows or underflows float64.
	CodeBadNumber
	// CodeUnexpected: a token where another was required: two operators
	// in a row, a missing operand, a missing operator between operands,
	// or trailing text after a complete expression.
	CodeUnexpected
	// CodeUnbalanced: a '(' that is never closed or a ')' that closes
	// nothing.
	CodeUnbalanced
	// CodeUnknownName: a name that is neither the field, a parameter, a
	// constant nor a function.
	CodeUnknownName
	// CodeNotFunction: the field, a parameter or a constant followed by an
	// argument list, as in "x(2)".
	CodeNotFunction
	// CodeNeedsArgs: a function name used without an argument list.
	CodeNeedsArgs
	// CodeArity: a function called with the wrong number of arguments.
	CodeArity
	// CodeTooDeep: nesting beyond the compiler's depth limit.
	CodeTooDeep
	// CodeConstant: the expression does not depend on the field and
	// Options.AllowConstant is false.
	CodeConstant
)

var codeNames = [...]string{
	CodeEmpty:       "empty expression",
	CodeBadChar:     "bad character",
	CodeBadNumber:   "bad number",
	CodeUnexpected:  "unexpected token",
	CodeUnbalanced:  "unbalanced parentheses",
	CodeUnknownName: "unknown name",
	CodeNotFunction: "not a function",
	CodeNeedsArgs:   "function without arguments",
	CodeArity:       "wrong argument count",
	CodeTooDeep:     "nested too deeply",
	CodeConstant:    "constant expression",
}

// String returns a short description of the class, e.g. "unknown name".
func (c Code) String() string {
	if c > 0 && int(c) < len(codeNames) {
		return codeNames[c]
	}
	return fmt.Sprintf("Code(%d)", int(c))
}

// SyntaxError reports a problem in the source text of an expression at a
// position. Columns count Unicode code points (an invalid UTF-8 byte counts
// as one), starting at 1; a column one past the end of the line points at
// the end of the input.
type SyntaxError struct {
	// Source is the complete source text that was compiled.
	Source string
	// Line is the 1-based line of the problem (1 unless the source spans
	// several lines).
	Line int
	// Col is the 1-based column within Line.
	Col int
	// Code classifies the problem.
	Code Code
	// Msg describes the problem in words.
	Msg string
}

// Error returns the source, the position and the message, e.g.
//
//	expression "x +": column 4: expected an operand, found end of input
func (e *SyntaxError) Error() string {
	pos := fmt.Sprintf("column %d", e.Col)
	if e.Line != 1 || strings.ContainsRune(e.Source, '\n') {
		pos = fmt.Sprintf("line %d, column %d", e.Line, e.Col)
	}
	return fmt.Sprintf("expression %q: %s: %s", e.Source, pos, e.Msg)
}

// Caret renders the offending source line and, below it, a caret under
// the column:
//
//	tanh(x/)
//	       ^
//
// Tabs before the column are repeated in the caret line so that the caret
// stays aligned wherever the terminal puts its tab stops.
func (e *SyntaxError) Caret() string {
	lines := strings.Split(e.Source, "\n")
	line := ""
	if e.Line >= 1 && e.Line <= len(lines) {
		line = strings.TrimSuffix(lines[e.Line-1], "\r")
	}
	var b strings.Builder
	b.WriteString(line)
	b.WriteByte('\n')
	col := 1
	for _, r := range line {
		if col >= e.Col {
			break
		}
		if r == '\t' {
			b.WriteByte('\t')
		} else {
			b.WriteByte(' ')
		}
		col++
	}
	for ; col < e.Col; col++ {
		b.WriteByte(' ')
	}
	b.WriteByte('^')
	return b.String()
}

// DeclError reports a bad declaration passed to Compile: a field or
// parameter name that is not an identifier or collides with a reserved
// name, or a parameter value that is not finite. It concerns the caller's
// arguments, not the source text, so it carries no position.
type DeclError struct {
	// Kind is "field" or "parameter".
	Kind string
	// Name is the offending name as given.
	Name string
	// Reason says what is wrong with it.
	Reason string
}

// Error returns e.g. `parameter "exp": collides with the function exp`.
func (e *DeclError) Error() string {
	return fmt.Sprintf("%s %q: %s", e.Kind, e.Name, e.Reason)
}
