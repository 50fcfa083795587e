package tables

import (
	"io"
	"math"
	"strconv"
	"strings"
)

// LaTeXPackages are the packages a document needs to \input a LaTeX
// table: booktabs for its rules, siunitx for its number columns, and
// longtable for Options.LongTable.
var LaTeXPackages = []string{"booktabs", "siunitx", "longtable"}

// texColumn is how one column of a LaTeX table is set.
type texColumn struct {
	spec    string   // the column's spec: l, c, r or S[...]
	s       bool     // a siunitx S column: text cells are braced
	sci     bool     // scientific notation
	numbers []string // the S column's numbers as siunitx reads them, per row ("" for a text cell)
}

// texColumns lays out the sheet's LaTeX columns: computed numbers in S
// columns, one notation per column, with a table-format reserving room
// for the widest integer part, fraction and exponent so that every cell
// aligns on its decimal marker (siunitx manual, Wright 2023, "Tabular
// material": table-format); text left-aligned, flags centred, row
// numbers and parameters right-aligned.
func texColumns(sh *sheet, nf numberFormat) []texColumn {
	sci := sh.notations(nf)
	out := make([]texColumn, len(sh.cols))
	for i, c := range sh.cols {
		switch c.kind {
		case number:
			tc := texColumn{s: true, sci: sci[i], numbers: make([]string, len(sh.rows))}
			for k, row := range sh.rows {
				if v := sh.value(c, row); v.ok && !math.IsNaN(v.num) && !math.IsInf(v.num, 0) {
					tc.numbers[k] = nf.siunitx(v.num, sci[i])
				}
			}
			// group-digits=none: no thin spaces inside a run of digits,
			// whatever the document's siunitx settings.
			tc.spec = "S[table-format=" + tableFormat(tc.numbers) + ",group-digits=none]"
			out[i] = tc
		case ordinal, input:
			out[i] = texColumn{spec: "r"}
		case flag:
			out[i] = texColumn{spec: "c"}
		default:
			out[i] = texColumn{spec: "l"}
		}
	}
	return out
}

// tableFormat is the siunitx table-format holding every number: an
// optional sign, the most integer digits, the most decimals and, where
// there is one, an exponent with its sign and most digits ("-1.4e-2").
func tableFormat(numbers []string) string {
	neg, expNeg, hasExp := false, false, false
	intDigits, decimals, expDigits := 1, 0, 0
	for _, s := range numbers {
		if s == "" {
			continue
		}
		if m, ok := strings.CutPrefix(s, "-"); ok {
			neg, s = true, m
		}
		mant, exp, ok := strings.Cut(s, "e")
		if ok {
			hasExp = true
			if e, ok := strings.CutPrefix(exp, "-"); ok {
				expNeg, exp = true, e
			}
			expDigits = max(expDigits, len(exp))
		}
		ip, fp, _ := strings.Cut(mant, ".")
		intDigits, decimals = max(intDigits, len(ip)), max(decimals, len(fp))
	}
	var b strings.Builder
	if neg {
		b.WriteByte('-')
	}
	b.WriteString(strconv.Itoa(intDigits) + "." + strconv.Itoa(decimals))
	if hasExp {
		b.WriteByte('e')
		if expNeg {
			b.WriteByte('-')
		}
		b.WriteString(strconv.Itoa(expDigits))
	}
	return b.String()
}

// texCell is the cell of row k in column i.
func texCell(sh *sheet, tcs []texColumn, i, k int, nf numberFormat) string {
	c, tc, row := sh.cols[i], tcs[i], sh.rows[k]
	v := sh.value(c, row)
	braced := func(s string) string {
		if tc.s {
			return "{" + s + "}"
		}
		return s
	}
	switch {
	case !v.ok:
		return braced("---")
	case tc.s && tc.numbers[k] != "":
		return tc.numbers[k]
	case c.kind == number:
		return braced(exactFormat.latex(v.num)) // NaN or an infinity
	case c.kind == ordinal:
		return strconv.Itoa(int(v.num))
	case c.kind == input:
		t := inputText(c, row)
		if strings.Contains(t, "/") {
			return "$" + strings.ReplaceAll(t, " ", "") + "$"
		}
		return exactFormat.latex(v.num)
	case c.kind == flag:
		return yesNo(v.flag)
	case c.kind == params:
		return texParams(v.params, v.written)
	}
	return escapeLaTeX(v.text)
}

// texParams is the parameter list in math mode, "$\alpha=1/3$, $n=1$":
// names sorted, Greek names as letters, values as written (a ratio as
// p/q, a decimal in the column notation of an exact number). A name that
// is not a plain word is written as escaped text.
func texParams(ps map[string]float64, written map[string]string) string {
	names := paramNames(ps)
	parts := make([]string, len(names))
	for i, n := range names {
		value := strings.Trim(exactFormat.latex(ps[n]), "$")
		if t := written[n]; strings.Contains(t, "/") {
			value = strings.ReplaceAll(t, " ", "")
		}
		parts[i] = "$" + texParamName(n) + "=" + value + "$"
	}
	return strings.Join(parts, ", ")
}

// texParamName is a parameter's name in math mode: \alpha for alpha,
// n for n, \mbox{...} (escaped text) for any other name.
func texParamName(n string) string {
	if g, ok := greek[n]; ok {
		return g
	}
	for _, c := range n {
		if !(c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z') {
			return `\mbox{` + escapeLaTeX(n) + "}"
		}
	}
	return n
}

// texHead is the table's head: in the wide layout a row of set names over
// their column groups, each underlined by a \cmidrule (booktabs manual,
// Fear 2020, section 3), then the column headers; headers of S columns
// are braced so that siunitx reads them as text.
func texHead(sh *sheet, tcs []texColumn) string {
	var b strings.Builder
	b.WriteString("\\toprule\n")
	if len(sh.cols) > 0 && sh.cols[len(sh.cols)-1].set >= 0 {
		var cells, rules []string
		for i := 0; i < len(sh.cols); {
			c := sh.cols[i]
			if c.set < 0 {
				cells = append(cells, "")
				i++
				continue
			}
			j := i
			for j < len(sh.cols) && sh.cols[j].set == c.set {
				j++
			}
			cells = append(cells, "\\multicolumn{"+strconv.Itoa(j-i)+"}{c}{"+escapeLaTeX(sh.sets[c.set].title())+"}")
			rules = append(rules, "\\cmidrule(lr){"+strconv.Itoa(i+1)+"-"+strconv.Itoa(j)+"}")
			i = j
		}
		b.WriteString(strings.Join(cells, " & ") + " \\\\\n" + strings.Join(rules, " ") + "\n")
	}
	heads := make([]string, len(sh.cols))
	for i, c := range sh.cols {
		heads[i] = c.latex
		if tcs[i].s {
			heads[i] = "{" + c.latex + "}"
		}
	}
	b.WriteString(strings.Join(heads, " & ") + " \\\\\n\\midrule\n")
	return b.String()
}

// writeLaTeX writes a tabular (in a table float when captioned or
// labelled) or a longtable, with booktabs rules.
func writeLaTeX(w io.Writer, sh *sheet, nf numberFormat, o Options) error {
	tcs := texColumns(sh, nf)
	var spec strings.Builder
	for _, tc := range tcs {
		spec.WriteString(tc.spec)
	}
	head := texHead(sh, tcs)
	caption := ""
	if o.Caption != "" {
		caption = "\\caption{" + o.Caption + "}"
	}
	if o.Label != "" {
		caption += "\\label{" + o.Label + "}"
	}
	float := caption != "" && !o.LongTable
	var b strings.Builder
	n := strconv.Itoa(max(len(sh.cols), 1))
	switch {
	case o.LongTable:
		b.WriteString("\\begin{longtable}{" + spec.String() + "}\n")
		if caption != "" {
			b.WriteString(caption + " \\\\\n")
		}
		b.WriteString(head + "\\endfirsthead\n")
		if o.Caption != "" {
			b.WriteString("\\multicolumn{" + n + "}{l}{\\tablename~\\thetable{} (continued)} \\\\\n")
		}
		b.WriteString(head + "\\endhead\n")
		b.WriteString("\\midrule\n\\multicolumn{" + n + "}{r}{(continued on the next page)} \\\\\n\\endfoot\n")
		b.WriteString("\\bottomrule\n\\endlastfoot\n")
	case float:
		b.WriteString("\\begin{table}\n\\centering\n" + caption + "\n")
		fallthrough
	default:
		b.WriteString("\\begin{tabular}{" + spec.String() + "}\n" + head)
	}
	cells := make([]string, len(sh.cols))
	for k := range sh.rows {
		for i := range sh.cols {
			cells[i] = texCell(sh, tcs, i, k, nf)
		}
		b.WriteString(strings.Join(cells, " & ") + " \\\\\n")
	}
	if o.LongTable {
		b.WriteString("\\end{longtable}\n")
	} else {
		b.WriteString("\\bottomrule\n\\end{tabular}\n")
		if float {
			b.WriteString("\\end{table}\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}
