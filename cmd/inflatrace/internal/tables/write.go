package tables

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/inflatrace/inflatrace/stages/study"
)

// Output formats.
const (
	CSV      = "csv"
	JSON     = "json"
	Markdown = "markdown"
	LaTeX    = "latex"
)

// Formats lists the output formats.
var Formats = []string{CSV, JSON, Markdown, LaTeX}

// Options choose a table's format, columns and number precision.
type Options struct {
	Format  string   // CSV, JSON, Markdown or LaTeX
	Columns []string // column names (ColumnNames, or param.NAME); empty means DefaultColumns
	// Digits is the number of significant digits of computed numbers,
	// 1 to 17; 0 means DefaultDigits. Model parameters are inputs and are
	// always written exactly.
	Digits int
	// Exact writes every number as the shortest decimal that reads back
	// to the same float64 (strconv 'g' -1). It excludes Digits.
	Exact bool
}

// Write writes rows as a table.
//
// CSV follows RFC 4180: a header of column names, CRLF line ends, fields
// quoted when they hold commas, quotes or line breaks (encoding/csv).
// Missing values are empty.
//
// JSON is an array with one object per row, keys the column names in
// column order; numbers are JSON numbers, flags booleans, the params
// column an object; missing and non-finite values are null.
//
// Markdown is a pipe table with plain-text headers and units, text
// left-aligned, numbers right-aligned, flags centred; pipes and
// backslashes in text are escaped, and a missing value is an em dash.
//
// LaTeX is a complete tabular environment to \input: a column spec of l
// (text), r (numbers) and c (flags), \hline above and below the header
// and at the end, headers in math mode with units, numbers in math mode
// ($2.481\times10^{13}$), text escaped, a missing value ---.
func Write(w io.Writer, rows []study.Result, opts Options) error {
	names := opts.Columns
	if len(names) == 0 && opts.Format == LaTeX {
		names = DefaultLaTeXColumns
	}
	cols, err := lookup(names)
	if err != nil {
		return err
	}
	var nf numberFormat
	switch {
	case opts.Exact && opts.Digits != 0:
		return fmt.Errorf("tables: give Digits or Exact, not both")
	case opts.Exact:
		nf = numberFormat{0}
	case opts.Digits == 0:
		nf = numberFormat{DefaultDigits}
	case opts.Digits < 1 || opts.Digits > 17:
		return fmt.Errorf("tables: %d significant digits, want 1 to 17", opts.Digits)
	default:
		nf = numberFormat{opts.Digits}
	}
	bw := bufio.NewWriter(w)
	switch opts.Format {
	case CSV:
		err = writeCSV(bw, rows, cols, nf)
	case JSON:
		err = writeJSON(bw, rows, cols, nf)
	case Markdown:
		err = writeMarkdown(bw, rows, cols, nf)
	case LaTeX:
		err = writeLaTeX(bw, rows, cols, nf)
	default:
		return fmt.Errorf("tables: unknown format %q (want %s)", opts.Format, strings.Join(Formats, ", "))
	}
	if err != nil {
		return err
	}
	return bw.Flush()
}

// exactFormat writes model parameters.
var exactFormat = numberFormat{0}

// paramText is "alpha=0.1, n=2": names sorted, values exact.
func paramText(ps map[string]float64) string {
	names := make([]string, 0, len(ps))
	for n := range ps {
		names = append(names, n)
	}
	sort.Strings(names)
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = n + "=" + strconv.FormatFloat(ps[n], 'g', -1, 64)
	}
	return strings.Join(parts, ", ")
}

func (c column) format(nf numberFormat) numberFormat {
	if c.kind == input || c.kind == ordinal {
		return exactFormat
	}
	return nf
}

func writeCSV(w io.Writer, rows []study.Result, cols []column, nf numberFormat) error {
	cw := csv.NewWriter(w)
	cw.UseCRLF = true
	rec := make([]string, len(cols))
	for i, c := range cols {
		rec[i] = c.name
	}
	if err := cw.Write(rec); err != nil {
		return err
	}
	for k, r := range rows {
		csvCells.fill(rec, k, r, cols, nf)
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// jsonString encodes s as a JSON string without HTML escaping.
func jsonString(s string) string {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.Encode(s) // a string always encodes
	return strings.TrimSuffix(b.String(), "\n")
}

func jsonNumber(nf numberFormat, x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "null"
	}
	return nf.machine(x)
}

func writeJSON(w io.Writer, rows []study.Result, cols []column, nf numberFormat) error {
	var b strings.Builder
	b.WriteString("[")
	for k, r := range rows {
		if k > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n  {")
		for i, c := range cols {
			if i > 0 {
				b.WriteString(", ")
			}
			b.WriteString(jsonString(c.name) + ": ")
			v := c.value(k, r)
			switch {
			case !v.ok:
				b.WriteString("null")
			case c.kind == number || c.kind == input || c.kind == ordinal:
				b.WriteString(jsonNumber(c.format(nf), v.num))
			case c.kind == flag:
				b.WriteString(strconv.FormatBool(v.flag))
			case c.kind == params:
				names := make([]string, 0, len(v.params))
				for n := range v.params {
					names = append(names, n)
				}
				sort.Strings(names)
				b.WriteString("{")
				for j, n := range names {
					if j > 0 {
						b.WriteString(", ")
					}
					b.WriteString(jsonString(n) + ": " + jsonNumber(exactFormat, v.params[n]))
				}
				b.WriteString("}")
			default:
				b.WriteString(jsonString(v.text))
			}
		}
		b.WriteString("}")
	}
	if len(rows) > 0 {
		b.WriteString("\n")
	}
	b.WriteString("]\n")
	_, err := io.WriteString(w, b.String())
	return err
}

func writeMarkdown(w io.Writer, rows []study.Result, cols []column, nf numberFormat) error {
	var b strings.Builder
	line := func(cells []string) {
		b.WriteString("|")
		for _, c := range cells {
			b.WriteString(" " + c + " |")
		}
		b.WriteString("\n")
	}
	cells := make([]string, len(cols))
	for i, c := range cols {
		cells[i] = escapeMarkdown(c.plain)
	}
	line(cells)
	for i, c := range cols {
		switch c.kind {
		case number, input, ordinal:
			cells[i] = "---:"
		case flag:
			cells[i] = ":---:"
		default:
			cells[i] = ":---"
		}
	}
	line(cells)
	for k, r := range rows {
		markdownCells.fill(cells, k, r, cols, nf)
		line(cells)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// cellStyle is how one format writes a cell: a missing value, a number, a
// flag, and text (parameters are text).
type cellStyle struct {
	missing string
	number  func(f numberFormat, x float64) string
	flag    func(bool) string
	text    func(string) string
}

var (
	csvCells      = cellStyle{"", numberFormat.machine, strconv.FormatBool, func(s string) string { return s }}
	markdownCells = cellStyle{"—", numberFormat.plain, yesNo, escapeMarkdown}
	latexCells    = cellStyle{"---", numberFormat.latex, yesNo, escapeLaTeX}
)

// fill writes the cells of row k (from 0), result r, for cols in this
// style.
func (st cellStyle) fill(cells []string, k int, r study.Result, cols []column, nf numberFormat) {
	for i, c := range cols {
		v := c.value(k, r)
		switch {
		case !v.ok:
			cells[i] = st.missing
		case c.kind == ordinal:
			cells[i] = strconv.Itoa(k + 1)
		case c.kind == number || c.kind == input:
			cells[i] = st.number(c.format(nf), v.num)
		case c.kind == flag:
			cells[i] = st.flag(v.flag)
		case c.kind == params:
			cells[i] = st.text(paramText(v.params))
		default:
			cells[i] = st.text(v.text)
		}
	}
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

// latexSpec is the tabular column spec: l, r or c per column.
func latexSpec(cols []column) string {
	var b strings.Builder
	for _, c := range cols {
		switch c.kind {
		case number, input, ordinal:
			b.WriteByte('r')
		case flag:
			b.WriteByte('c')
		default:
			b.WriteByte('l')
		}
	}
	return b.String()
}

func writeLaTeX(w io.Writer, rows []study.Result, cols []column, nf numberFormat) error {
	var b strings.Builder
	b.WriteString(`\begin{tabular}{` + latexSpec(cols) + "}\n\\hline\n")
	cells := make([]string, len(cols))
	for i, c := range cols {
		cells[i] = c.latex
	}
	b.WriteString(strings.Join(cells, " & ") + " \\\\\n\\hline\n")
	for k, r := range rows {
		latexCells.fill(cells, k, r, cols, nf)
		b.WriteString(strings.Join(cells, " & ") + " \\\\\n")
	}
	b.WriteString("\\hline\n\\end{tabular}\n")
	_, err := io.WriteString(w, b.String())
	return err
}
