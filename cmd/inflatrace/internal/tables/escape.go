package tables

import "strings"

// latexEscapes are the replacements of characters special to LaTeX in
// text: the ten special characters # $ % & ~ _ ^ \ { } (Lamport 1994,
// "LaTeX: A Document Preparation System", 2nd ed., chapter 2) and < > |,
// which the default OT1 font encoding prints as other glyphs (common
// practice). Line breaks and tabs become
// spaces, since a table cell is one line.
var latexEscapes = map[rune]string{
	'\\': `\textbackslash{}`,
	'&':  `\&`,
	'%':  `\%`,
	'$':  `\$`,
	'#':  `\#`,
	'_':  `\_`,
	'{':  `\{`,
	'}':  `\}`,
	'~':  `\textasciitilde{}`,
	'^':  `\textasciicircum{}`,
	'<':  `\textless{}`,
	'>':  `\textgreater{}`,
	'|':  `\textbar{}`,
	'\n': " ",
	'\r': " ",
	'\t': " ",
}

// escapeLaTeX makes s safe as LaTeX text.
func escapeLaTeX(s string) string {
	var b strings.Builder
	for _, c := range s {
		if e, ok := latexEscapes[c]; ok {
			b.WriteString(e)
		} else {
			b.WriteRune(c)
		}
	}
	return b.String()
}

// escapeMarkdown makes s safe in a pipe-table cell: a pipe would end the
// cell, so it is written \|, and a backslash as \\ so that it cannot
// escape what follows (CommonMark 0.31, section 2.4, backslash escapes;
// GitHub Flavored Markdown, tables extension); line breaks become spaces.
func escapeMarkdown(s string) string {
	r := strings.NewReplacer(`\`, `\\`, `|`, `\|`, "\r\n", " ", "\n", " ", "\r", " ")
	return r.Replace(s)
}
