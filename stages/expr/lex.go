package expr

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
)

// tokKind is the kind of a lexical token.
type tokKind uint8

const (
	tEOF tokKind = iota
	tNum
	tName
	tPlus
	tMinus
	tStar
	tSlash
	tCaret
	tLParen
	tRParen
	tComma
)

// token is one lexical token with its position.
type token struct {
	kind      tokKind
	text      string  // the source text of the token
	val       float64 // the value of a tNum
	line, col int     // 1-based position of the first character
}

// describe names the token for error messages: `'*'`, `number 1.5`,
// `name "y"`, `end of input`.
func (t token) describe() string {
	switch t.kind {
	case tEOF:
		return "end of input"
	case tNum:
		return "number " + t.text
	case tName:
		return fmt.Sprintf("name %q", t.text)
	}
	return "'" + t.text + "'"
}

// lexer splits source text into tokens on demand, so that errors are
// reported in source order.
type lexer struct {
	src       string
	rs        []rune
	i         int // index into rs of the next unread rune
	line, col int // position of rs[i]
}

func newLexer(src string) *lexer {
	return &lexer{src: src, rs: []rune(src), line: 1, col: 1}
}

func (l *lexer) errAt(line, col int, code Code, format string, args ...any) *SyntaxError {
	return &SyntaxError{Source: l.src, Line: line, Col: col, Code: code, Msg: fmt.Sprintf(format, args...)}
}

// advance consumes one rune, keeping line and column.
func (l *lexer) advance() {
	if l.rs[l.i] == '\n' {
		l.line++
		l.col = 1
	} else {
		l.col++
	}
	l.i++
}

func (l *lexer) peek(k int) rune {
	if l.i+k < len(l.rs) {
		return l.rs[l.i+k]
	}
	return 0
}

func isSpace(r rune) bool { return r == ' ' || r == '\t' || r == '\n' || r == '\r' }

func isDigit(r rune) bool { return '0' <= r && r <= '9' }

func isIdentStart(r rune) bool { return r == '_' || unicode.IsLetter(r) }

func isIdentPart(r rune) bool { return isIdentStart(r) || unicode.IsDigit(r) }

// isIdent reports whether s is an identifier: a letter or underscore
// followed by letters, digits and underscores.
func isIdent(s string) bool {
	if s == "" {
		return false
	}
	for i, r := range s {
		if !(isIdentPart(r) && (i > 0 || isIdentStart(r))) {
			return false
		}
	}
	return true
}

var punct = map[rune]tokKind{
	'+': tPlus, '-': tMinus, '*': tStar, '/': tSlash, '^': tCaret,
	'(': tLParen, ')': tRParen, ',': tComma,
}

// next returns the next token, or a *SyntaxError for a character that
// starts no token or a malformed number.
func (l *lexer) next() (token, *SyntaxError) {
	for l.i < len(l.rs) && isSpace(l.rs[l.i]) {
		l.advance()
	}
	t := token{line: l.line, col: l.col}
	if l.i >= len(l.rs) {
		return t, nil
	}
	r := l.rs[l.i]
	start := l.i
	switch {
	case isDigit(r) || r == '.':
		return l.number(t)
	case isIdentStart(r):
		for l.i < len(l.rs) && isIdentPart(l.rs[l.i]) {
			l.advance()
		}
		t.kind, t.text = tName, string(l.rs[start:l.i])
		return t, nil
	}
	if k, ok := punct[r]; ok {
		l.advance()
		t.kind, t.text = k, string(r)
		return t, nil
	}
	if r == '\uFFFD' {
		return t, l.errAt(t.line, t.col, CodeBadChar, "invalid character (not UTF-8 text, or U+FFFD)")
	}
	return t, l.errAt(t.line, t.col, CodeBadChar, "unexpected character %q", r)
}

// number scans digits [ "." digits ] [ ("e"|"E") ["+"|"-"] digits ], with at
// least one mantissa digit on either side of the point.
func (l *lexer) number(t token) (token, *SyntaxError) {
	start := l.i
	mant := 0
	for isDigit(l.peek(0)) {
		l.advance()
		mant++
	}
	if l.peek(0) == '.' {
		l.advance()
		for isDigit(l.peek(0)) {
			l.advance()
			mant++
		}
	}
	if mant == 0 {
		return t, l.errAt(t.line, t.col, CodeBadNumber, "malformed number %q: a decimal point needs digits", string(l.rs[start:l.i]))
	}
	mantEnd := l.i
	if r := l.peek(0); r == 'e' || r == 'E' {
		l.advance()
		if r := l.peek(0); r == '+' || r == '-' {
			l.advance()
		}
		digits := 0
		for isDigit(l.peek(0)) {
			l.advance()
			digits++
		}
		if digits == 0 {
			return t, l.errAt(t.line, t.col, CodeBadNumber, "malformed number %q: the exponent needs digits", string(l.rs[start:l.i]))
		}
	}
	t.kind, t.text = tNum, string(l.rs[start:l.i])
	v, err := strconv.ParseFloat(t.text, 64)
	if err != nil {
		// The text is well formed by construction, so the only failure is
		// a value beyond the float64 range.
		return t, l.errAt(t.line, t.col, CodeBadNumber, "number %s is out of range for float64", t.text)
	}
	if v == 0 && strings.ContainsAny(string(l.rs[start:mantEnd]), "123456789") {
		return t, l.errAt(t.line, t.col, CodeBadNumber, "number %s underflows to zero in float64", t.text)
	}
	t.val = v
	return t, nil
}

// firstToken returns the position of the first token of src.
func firstToken(src string) (line, col int) {
	l := newLexer(src)
	t, _ := l.next() // only the position matters, which an error keeps too
	return t.line, t.col
}
