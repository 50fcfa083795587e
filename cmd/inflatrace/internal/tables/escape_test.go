package tables

import (
	"strings"
	"testing"
)

// TestEscapeLaTeXEach: each special character's replacement (Lamport
// 1994, chapter 2: \# \$ \% \& \_ \{ \} as control symbols; \textbackslash,
// \textasciitilde, \textasciicircum, \textless, \textgreater, \textbar
// as text-mode commands, ended by {} so that following letters are not
// read into the command name).
func TestEscapeLaTeXEach(t *testing.T) {
	for in, want := range map[string]string{
		`\`: `\textbackslash{}`, `&`: `\&`, `%`: `\%`, `$`: `\$`, `#`: `\#`, `_`: `\_`,
		`{`: `\{`, `}`: `\}`, `~`: `\textasciitilde{}`, `^`: `\textasciicircum{}`,
		`<`: `\textless{}`, `>`: `\textgreater{}`, `|`: `\textbar{}`,
		"a\nb": "a b", "a\tb": "a b",
		`plain text 1.5 (x) [y] α`: `plain text 1.5 (x) [y] α`,
		`\textbf{x}`:               `\textbackslash{}textbf\{x\}`,
		`50% of $5 & #1_a^b~{}\\`:  `50\% of \$5 \& \#1\_a\textasciicircum{}b\textasciitilde{}\{\}\textbackslash{}\textbackslash{}`,
	} {
		if got := escapeLaTeX(in); got != want {
			t.Errorf("escapeLaTeX(%q) = %q, want %q", in, got, want)
		}
	}
}

// unescapeLaTeX decodes escapeLaTeX's output, failing on any special
// character that is not part of an escape: a minimal reader of the LaTeX
// text syntax for the sequences used.
func unescapeLaTeX(s string) (string, bool) {
	inverse := map[string]string{}
	for c, e := range latexEscapes {
		if strings.HasPrefix(e, `\`) {
			inverse[e] = string(c)
		}
	}
	var b strings.Builder
	for len(s) > 0 {
		matched := false
		for e, c := range inverse {
			if strings.HasPrefix(s, e) {
				b.WriteString(c)
				s = s[len(e):]
				matched = true
				break
			}
		}
		if matched {
			continue
		}
		if strings.ContainsRune(`\&%$#_{}~^<>|`, rune(s[0])) {
			return b.String(), false
		}
		b.WriteByte(s[0])
		s = s[1:]
	}
	return b.String(), true
}

// TestEscapeLaTeXExhaustive: every string of up to three characters from
// printable ASCII (95^3 + 95^2 + 95 = 866,495 strings) escapes to text
// with no bare special character that decodes back to itself; so does
// every pair with a tab or line break (written as a space).
func TestEscapeLaTeXExhaustive(t *testing.T) {
	alphabet := make([]byte, 0, 95)
	for c := byte(32); c < 127; c++ {
		alphabet = append(alphabet, c)
	}
	check := func(in, want string) {
		out := escapeLaTeX(in)
		back, ok := unescapeLaTeX(out)
		if !ok || back != want {
			t.Fatalf("escapeLaTeX(%q) = %q: decodes to %q (clean %v)", in, out, back, ok)
		}
	}
	buf := make([]byte, 3)
	for _, a := range alphabet {
		buf[0] = a
		check(string(buf[:1]), string(buf[:1]))
		for _, b := range alphabet {
			buf[1] = b
			check(string(buf[:2]), string(buf[:2]))
			for _, c := range alphabet {
				buf[2] = c
				check(string(buf[:3]), string(buf[:3]))
			}
		}
	}
	for _, ws := range []byte{'\t', '\n', '\r'} {
		for _, a := range alphabet {
			check(string([]byte{ws, a}), " "+string(a))
			check(string([]byte{a, ws}), string(a)+" ")
		}
	}
}

// TestEscapeMarkdown: pipes and backslashes are backslash-escaped
// (CommonMark 0.31, section 2.4; GitHub Flavored Markdown tables), line
// breaks become spaces; after escaping, no pipe is preceded by an even
// number of backslashes, so none can end a cell (every string of up to
// three characters over an alphabet of the relevant characters).
func TestEscapeMarkdown(t *testing.T) {
	for in, want := range map[string]string{
		`a|b`: `a\|b`, `a\b`: `a\\b`, `\|`: `\\\|`, "x\ny": "x y", "x\r\ny": "x y", `*_[]`: `*_[]`,
	} {
		if got := escapeMarkdown(in); got != want {
			t.Errorf("escapeMarkdown(%q) = %q, want %q", in, got, want)
		}
	}
	alphabet := []byte{'|', '\\', 'a', ' ', '\n'}
	var walk func(prefix []byte)
	walk = func(prefix []byte) {
		out := escapeMarkdown(string(prefix))
		for i := 0; i < len(out); i++ {
			if out[i] != '|' {
				continue
			}
			n := 0
			for j := i - 1; j >= 0 && out[j] == '\\'; j-- {
				n++
			}
			if n%2 == 0 {
				t.Fatalf("escapeMarkdown(%q) = %q has a bare pipe at %d", prefix, out, i)
			}
		}
		if len(prefix) < 3 {
			for _, c := range alphabet {
				walk(append(append([]byte(nil), prefix...), c))
			}
		}
	}
	walk(nil)
}
