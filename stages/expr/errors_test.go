package expr

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Every error class, with its position and the words a user needs.
func TestSyntaxErrors(t *testing.T) {
	params := map[string]float64{"alpha": 1, "f": 2}
	deep := strings.Repeat("(", maxDepth) + "x" + strings.Repeat(")", maxDepth)
	long := "x" + strings.Repeat("+x", maxDepth)
	rows := []struct {
		src       string
		code      Code
		line, col int
		contains  []string
	}{
		{"", CodeEmpty, 1, 1, []string{"empty"}},
		{"  \t\n ", CodeEmpty, 2, 2, []string{"empty"}},
		{"x +", CodeUnexpected, 1, 4, []string{"expected an operand", "end of input"}},
		{"x + * 2", CodeUnexpected, 1, 5, []string{"expected an operand", "'*'"}},
		{"x ** 2", CodeUnexpected, 1, 4, []string{"'*'", "^"}},
		{"+x", CodeUnexpected, 1, 1, []string{"'+'", "unary plus"}},
		{"x / / 2", CodeUnexpected, 1, 5, []string{"'/'"}},
		{"x y", CodeUnexpected, 1, 3, []string{`name "y"`, "missing operator"}},
		{"2x", CodeUnexpected, 1, 2, []string{`name "x"`, "missing operator"}},
		{"x 2", CodeUnexpected, 1, 3, []string{"number 2"}},
		{"1.5.2*x", CodeUnexpected, 1, 4, []string{"number .2"}},
		{"x, 1", CodeUnexpected, 1, 2, []string{"','"}},
		{"()", CodeUnexpected, 1, 2, []string{"expected an operand", "')'"}},
		{"(x 2)", CodeUnexpected, 1, 4, []string{"expected an operator or ')'"}},
		{"pow(x 2)", CodeUnexpected, 1, 7, []string{"arguments of pow"}},
		{"exp(x,)", CodeUnexpected, 1, 7, []string{"expected an operand"}},
		{"(x", CodeUnbalanced, 1, 1, []string{"never closed"}},
		{"((x)", CodeUnbalanced, 1, 1, []string{"never closed"}},
		{"x*(1+(x)", CodeUnbalanced, 1, 3, []string{"never closed"}},
		{"exp(x", CodeUnbalanced, 1, 4, []string{"never closed"}},
		{"x)", CodeUnbalanced, 1, 2, []string{"closes no"}},
		{"(x))", CodeUnbalanced, 1, 4, []string{"closes no"}},
		{"1e", CodeBadNumber, 1, 1, []string{`"1e"`, "exponent"}},
		{"x*1e+", CodeBadNumber, 1, 3, []string{`"1e+"`, "exponent"}},
		{"x*2E-y", CodeBadNumber, 1, 3, []string{`"2E-"`}},
		{".", CodeBadNumber, 1, 1, []string{`"."`}},
		{"x.y", CodeBadNumber, 1, 2, []string{`"."`}},
		{"1e400*x", CodeBadNumber, 1, 1, []string{"1e400", "out of range"}},
		{"x + 1e-400", CodeBadNumber, 1, 5, []string{"1e-400", "underflows"}},
		{"x $ 2", CodeBadChar, 1, 3, []string{"'$'"}},
		{"x²", CodeBadChar, 1, 2, []string{"'²'"}},
		{"x + \xff", CodeBadChar, 1, 5, []string{"UTF-8"}},
		{"y", CodeUnknownName, 1, 1, []string{`"y"`, "field x", "parameters alpha, f", "constant pi", "functions abs, acosh", "tanh"}},
		{"x*beta", CodeUnknownName, 1, 3, []string{`"beta"`, "parameters alpha, f"}},
		{"e^x", CodeUnknownName, 1, 1, []string{`"e"`, "exp(1)"}},
		{"Exp(x)", CodeUnknownName, 1, 1, []string{"unknown function", "did you mean exp?"}},
		{"x + PI", CodeUnknownName, 1, 5, []string{"did you mean pi?"}},
		{"foo(x)", CodeUnknownName, 1, 1, []string{`unknown function "foo"`, "abs, acosh"}},
		{"x(2)", CodeNotFunction, 1, 1, []string{"x is not a function", "x*(...)"}},
		{"x + alpha(2)", CodeNotFunction, 1, 5, []string{"alpha is not a function"}},
		{"pi(1)", CodeNotFunction, 1, 1, []string{"pi is not a function"}},
		{"exp", CodeNeedsArgs, 1, 1, []string{"exp needs 1 argument", "exp(u)"}},
		{"x + sin * 2", CodeNeedsArgs, 1, 5, []string{"sin needs"}},
		{"pow(x)", CodeArity, 1, 1, []string{"pow takes 2 arguments, got 1", "pow(a, b)"}},
		{"x * exp(x, 2)", CodeArity, 1, 5, []string{"exp takes 1 argument, got 2"}},
		{"tanh()", CodeArity, 1, 1, []string{"tanh takes 1 argument, got 0"}},
		{"pow(x, 2, 3)", CodeArity, 1, 1, []string{"pow takes 2 arguments, got 3"}},
		{"alpha*pi", CodeConstant, 1, 1, []string{"does not depend on the field x", "3.14159"}},
		{"3", CodeConstant, 1, 1, []string{"constant 3"}},
		{"\n  (2)", CodeConstant, 2, 3, []string{"constant 2"}},
		{deep, CodeTooDeep, 1, maxDepth + 1, []string{"nested more than 1000"}},
		{long, CodeTooDeep, 1, 2 * maxDepth, []string{"nested more than 1000"}},
		{"x +\n  * 2", CodeUnexpected, 2, 3, []string{"'*'"}},
		{"x\n\n y", CodeUnexpected, 3, 2, []string{`name "y"`}},
	}
	for _, r := range rows {
		_, err := Compile(r.src, "x", params)
		checkSyntaxError(t, r.src, err, r.code, r.line, r.col, r.contains)
	}
	// The list of allowed names with one parameter and with none.
	_, err := Compile("y", "x", map[string]float64{"alpha": 1})
	checkSyntaxError(t, "y", err, CodeUnknownName, 1, 1, []string{"field x; parameter alpha; constant pi"})
	_, err = Compile("y", "x", nil)
	checkSyntaxError(t, "y", err, CodeUnknownName, 1, 1, []string{"field x; no parameters; constant pi"})
}

// checkSyntaxError asserts that err is a *SyntaxError of class code at
// line:col whose message contains each of contains.
func checkSyntaxError(t *testing.T, src string, err error, code Code, line, col int, contains []string) {
	t.Helper()
	var se *SyntaxError
	if !errors.As(err, &se) {
		t.Errorf("Compile(%q) = %v, want a *SyntaxError", src, err)
		return
	}
	if se.Code != code || se.Line != line || se.Col != col {
		t.Errorf("Compile(%q): %v at %d:%d, want %v at %d:%d (%v)", src, se.Code, se.Line, se.Col, code, line, col, err)
	}
	for _, s := range contains {
		if !strings.Contains(se.Msg, s) {
			t.Errorf("Compile(%q): message %q lacks %q", src, se.Msg, s)
		}
	}
	if se.Source != src || !strings.Contains(err.Error(), se.Msg) {
		t.Errorf("Compile(%q): Source %q, Error() %q", src, se.Source, err.Error())
	}
}

// The nesting limit is exactly maxDepth.
func TestDepthLimitIsExact(t *testing.T) {
	ok := strings.Repeat("(", maxDepth-1) + "x" + strings.Repeat(")", maxDepth-1)
	if _, err := Compile(ok, "x", nil); err != nil {
		t.Errorf("%d nested parentheses: %v", maxDepth-1, err)
	}
	if _, err := Compile("x"+strings.Repeat("+x", maxDepth-1), "x", nil); err != nil {
		t.Errorf("a sum of %d terms: %v", maxDepth, err)
	}
}

func TestErrorText(t *testing.T) {
	_, err := Compile("tanh(x/)", "x", nil)
	var se *SyntaxError
	if !errors.As(err, &se) {
		t.Fatalf("got %v", err)
	}
	if got, want := err.Error(), `expression "tanh(x/)": column 8: expected an operand, found ')'`; got != want {
		t.Errorf("Error() = %q, want %q", got, want)
	}
	if got, want := se.Caret(), "tanh(x/)\n       ^"; got != want {
		t.Errorf("Caret() =\n%s\nwant\n%s", got, want)
	}
	// A tab before the column is repeated so the caret stays aligned; the
	// caret may sit one past the end of the line.
	_, err = Compile("\tx +", "x", nil)
	errors.As(err, &se)
	if got, want := se.Caret(), "\tx +\n\t   ^"; got != want {
		t.Errorf("Caret() = %q, want %q", got, want)
	}
	// Multi-line sources name the line and render only it.
	_, err = Compile("x +\r\n  * 2", "x", nil)
	errors.As(err, &se)
	if got, want := se.Caret(), "  * 2\n  ^"; got != want {
		t.Errorf("Caret() = %q, want %q", got, want)
	}
	if !strings.Contains(err.Error(), "line 2, column 3") {
		t.Errorf("Error() = %q lacks the line", err.Error())
	}
	// Columns count code points, not bytes.
	_, err = Compile("φ + $", "φ", nil)
	errors.As(err, &se)
	if se.Col != 5 || se.Caret() != "φ + $\n    ^" {
		t.Errorf("column %d, caret %q", se.Col, se.Caret())
	}
	if CodeArity.String() != "wrong argument count" || Code(99).String() != "Code(99)" {
		t.Errorf("Code.String: %q, %q", CodeArity.String(), Code(99).String())
	}
}

func TestDeclErrors(t *testing.T) {
	rows := []struct {
		field    string
		params   map[string]float64
		kind     string
		name     string
		contains string
	}{
		{"", nil, "field", "", "not an identifier"},
		{"2x", nil, "field", "2x", "not an identifier"},
		{"x y", nil, "field", "x y", "not an identifier"},
		{"exp", nil, "field", "exp", "function exp"},
		{"pi", nil, "field", "pi", "constant pi"},
		{"x", map[string]float64{"a-b": 1}, "parameter", "a-b", "not an identifier"},
		{"x", map[string]float64{"sqrt": 1}, "parameter", "sqrt", "function sqrt"},
		{"x", map[string]float64{"pi": 3}, "parameter", "pi", "constant pi"},
		{"x", map[string]float64{"x": 1}, "parameter", "x", "same name as the field"},
		{"x", map[string]float64{"a": math.NaN()}, "parameter", "a", "NaN is not finite"},
		{"x", map[string]float64{"a": math.Inf(-1)}, "parameter", "a", "-Inf is not finite"},
	}
	for _, r := range rows {
		_, err := Compile("x", r.field, r.params)
		var de *DeclError
		if !errors.As(err, &de) {
			t.Errorf("field %q, params %v: got %v, want a *DeclError", r.field, r.params, err)
			continue
		}
		if de.Kind != r.kind || de.Name != r.name || !strings.Contains(err.Error(), r.contains) {
			t.Errorf("field %q, params %v: %v (kind %q, name %q), want kind %q, name %q, containing %q",
				r.field, r.params, err, de.Kind, de.Name, r.kind, r.name, r.contains)
		}
	}
}
