package tables

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
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

// Options choose a table's format, layout, columns, rows and number
// precision.
type Options struct {
	Format string // CSV, JSON, Markdown or LaTeX
	// Layout is Wide (the default when empty) or Long.
	Layout  string
	Columns []string // column names (ColumnNames, or param.NAME); empty means the format's defaults
	// Where keeps the rows meeting every condition "COLUMN OP VALUE"
	// (OP one of = != < <= > >=); Sort orders them by columns, "-COLUMN"
	// descending. See the package documentation.
	Where []string
	Sort  []string
	// Digits is the number of significant digits of computed numbers,
	// 1 to 17. 0 means the format's default: exact in CSV and JSON,
	// DefaultDigits in Markdown and LaTeX. Model parameters are inputs and
	// are always written exactly (in Markdown and LaTeX as the study wrote
	// them).
	Digits int
	// Exact writes every number as the shortest decimal that reads back
	// to the same float64 (strconv 'g' -1). It excludes Digits.
	Exact bool
	// LaTeX only: LongTable writes a longtable (its head repeated on
	// every page) instead of a tabular; Caption (LaTeX text) and Label (a
	// \label key) caption the table, in a table float around a tabular.
	LongTable bool
	Caption   string
	Label     string
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
// LaTeX is a booktabs table to \input (see the package documentation for
// its layout and the preamble it needs).
//
// A bad option is an *OptionError.
func Write(w io.Writer, rows []study.Result, opts Options) error {
	names := opts.Columns
	if len(names) == 0 && opts.Format == LaTeX {
		names = DefaultLaTeXColumns
	}
	cols, err := lookup(names)
	if err != nil {
		return &OptionError{"--columns", strings.Join(names, ","), err}
	}
	var nf numberFormat
	switch {
	case opts.Exact && opts.Digits != 0:
		return &OptionError{"--digits", strconv.Itoa(opts.Digits), fmt.Errorf("give --digits or --exact, not both")}
	case opts.Exact:
		nf = exactFormat
	case opts.Digits == 0 && (opts.Format == CSV || opts.Format == JSON):
		nf = exactFormat
	case opts.Digits == 0:
		nf = numberFormat{DefaultDigits}
	case opts.Digits < 1 || opts.Digits > 17:
		return &OptionError{"--digits", strconv.Itoa(opts.Digits), fmt.Errorf("want 1 to 17 significant digits")}
	default:
		nf = numberFormat{opts.Digits}
	}
	if !slices.Contains(Formats, opts.Format) {
		return &OptionError{"--format", opts.Format, fmt.Errorf("unknown format (want %s)", strings.Join(Formats, ", "))}
	}
	if opts.Format != LaTeX {
		for _, o := range []struct {
			name, value string
			set         bool
		}{{"--longtable", "true", opts.LongTable}, {"--caption", opts.Caption, opts.Caption != ""}, {"--label", opts.Label, opts.Label != ""}} {
			if o.set {
				return &OptionError{o.name, o.value, fmt.Errorf("LaTeX's only (--format latex), not %s's", opts.Format)}
			}
		}
	}
	if strings.ContainsAny(opts.Label, `\{}%#&~^$`) {
		return &OptionError{"--label", opts.Label, fmt.Errorf("a label key may not hold any of \\ { } %% # & ~ ^ $")}
	}
	sh, err := build(rows, cols, opts.Layout, len(opts.Columns) == 0)
	if err != nil {
		return err
	}
	if err := sh.filter(opts.Where); err != nil {
		return err
	}
	if err := sh.order(opts.Sort); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	switch opts.Format {
	case CSV:
		err = writeCSV(bw, sh, nf)
	case JSON:
		err = writeJSON(bw, sh, nf)
	case Markdown:
		err = writeMarkdown(bw, sh, nf)
	case LaTeX:
		err = writeLaTeX(bw, sh, nf, opts)
	}
	if err != nil {
		return err
	}
	return bw.Flush()
}

// exactFormat writes model parameters, and every number of CSV and JSON
// by default.
var exactFormat = numberFormat{0}

// paramText is "alpha=1/3, n=2": names sorted, values as written (where
// written has them) or exact.
func paramText(ps map[string]float64, written map[string]string) string {
	names := paramNames(ps)
	parts := make([]string, len(names))
	for i, n := range names {
		t, ok := written[n]
		if !ok {
			t = strconv.FormatFloat(ps[n], 'g', -1, 64)
		}
		parts[i] = n + "=" + t
	}
	return strings.Join(parts, ", ")
}

// paramNames are the parameters' names, sorted.
func paramNames(ps map[string]float64) []string {
	names := make([]string, 0, len(ps))
	for n := range ps {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

func (c column) format(nf numberFormat) numberFormat {
	if c.kind == input || c.kind == ordinal {
		return exactFormat
	}
	return nf
}

func writeCSV(w io.Writer, sh *sheet, nf numberFormat) error {
	cw := csv.NewWriter(w)
	cw.UseCRLF = true
	rec := make([]string, len(sh.cols))
	for i, c := range sh.cols {
		rec[i] = c.key()
	}
	if err := cw.Write(rec); err != nil {
		return err
	}
	for _, row := range sh.rows {
		for i, c := range sh.cols {
			rec[i] = machineCell(c, sh.value(c, row), nf)
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// machineCell is a CSV cell: numbers (parameters too) in Go's shortest
// form, flags true or false, missing values empty.
func machineCell(c sheetCol, v cell, nf numberFormat) string {
	switch {
	case !v.ok:
		return ""
	case c.kind == number || c.kind == input || c.kind == ordinal:
		return c.format(nf).machine(v.num)
	case c.kind == flag:
		return strconv.FormatBool(v.flag)
	case c.kind == params:
		return paramText(v.params, v.written)
	}
	return v.text
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

func writeJSON(w io.Writer, sh *sheet, nf numberFormat) error {
	var b strings.Builder
	b.WriteString("[")
	for k, row := range sh.rows {
		if k > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n  {")
		for i, c := range sh.cols {
			if i > 0 {
				b.WriteString(", ")
			}
			b.WriteString(jsonString(c.key()) + ": ")
			v := sh.value(c, row)
			switch {
			case !v.ok:
				b.WriteString("null")
			case c.kind == number || c.kind == input || c.kind == ordinal:
				b.WriteString(jsonNumber(c.format(nf), v.num))
			case c.kind == flag:
				b.WriteString(strconv.FormatBool(v.flag))
			case c.kind == params:
				b.WriteString("{")
				for j, n := range paramNames(v.params) {
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
	if len(sh.rows) > 0 {
		b.WriteString("\n")
	}
	b.WriteString("]\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// markdownHeader is a column's Markdown header: in the wide layout, a
// column of one set is "set: header".
func markdownHeader(sh *sheet, c sheetCol) string {
	if c.set < 0 {
		return c.plain
	}
	return sh.sets[c.set].title() + ": " + c.plain
}

func writeMarkdown(w io.Writer, sh *sheet, nf numberFormat) error {
	var b strings.Builder
	line := func(cells []string) {
		b.WriteString("|")
		for _, c := range cells {
			b.WriteString(" " + c + " |")
		}
		b.WriteString("\n")
	}
	cells := make([]string, len(sh.cols))
	for i, c := range sh.cols {
		cells[i] = escapeMarkdown(markdownHeader(sh, c))
	}
	line(cells)
	for i, c := range sh.cols {
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
	notations := sh.notations(nf)
	for _, row := range sh.rows {
		for i, c := range sh.cols {
			v := sh.value(c, row)
			switch {
			case !v.ok:
				cells[i] = "—"
			case c.kind == ordinal:
				cells[i] = strconv.Itoa(int(v.num))
			case c.kind == input:
				cells[i] = escapeMarkdown(inputText(c, row))
			case c.kind == number:
				cells[i] = nf.plainIn(v.num, notations[i])
			case c.kind == flag:
				cells[i] = yesNo(v.flag)
			case c.kind == params:
				cells[i] = escapeMarkdown(paramText(v.params, v.written))
			default:
				cells[i] = escapeMarkdown(v.text)
			}
		}
		line(cells)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// inputText is a param.NAME cell as the study wrote it.
func inputText(c sheetCol, row sheetRow) string {
	name := strings.TrimPrefix(c.name, ParamPrefix)
	if t, ok := WrittenParams(row.pred)[name]; ok {
		return t
	}
	return ""
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}
