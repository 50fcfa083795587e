package tables

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// Grid is a table that is not a list of results (diff's comparison, say):
// columns and rows of cells, written in any of the Formats with the same
// number layout, escaping and conventions as Write.
type Grid struct {
	Columns []GridColumn
	Rows    [][]Cell
}

// GridColumn is one column of a Grid.
type GridColumn struct {
	Name    string // CSV header and JSON key
	Plain   string // Markdown header
	LaTeX   string // LaTeX header (math mode where it needs it)
	Numeric bool   // right-aligned
	// Exact writes the column's numbers exactly (row numbers, inputs).
	Exact bool
}

// Cell is one cell of a Grid: a number, a text, or missing.
type Cell struct {
	Num     float64
	IsNum   bool
	Text    string
	LaTeX   string // raw LaTeX for the cell, used instead of Text when set
	Missing bool
}

// Number is a numeric cell.
func Number(x float64) Cell { return Cell{Num: x, IsNum: true} }

// Text is a text cell.
func Text(s string) Cell { return Cell{Text: s} }

// WriteGrid writes g in format (CSV, JSON, Markdown or LaTeX) with
// numbers to digits significant figures (0: DefaultDigits).
func WriteGrid(w io.Writer, g Grid, format string, digits int) error {
	if digits == 0 {
		digits = DefaultDigits
	}
	if digits < 1 || digits > 17 {
		return fmt.Errorf("tables: %d significant digits, want 1 to 17", digits)
	}
	nf := numberFormat{digits}
	for _, r := range g.Rows {
		if len(r) != len(g.Columns) {
			return fmt.Errorf("tables: a row of %d cells in a grid of %d columns", len(r), len(g.Columns))
		}
	}
	format1 := func(c GridColumn) numberFormat {
		if c.Exact {
			return exactFormat
		}
		return nf
	}
	bw := bufio.NewWriter(w)
	switch format {
	case CSV:
		cw := csv.NewWriter(bw)
		cw.UseCRLF = true
		rec := make([]string, len(g.Columns))
		for i, c := range g.Columns {
			rec[i] = c.Name
		}
		cw.Write(rec)
		for _, r := range g.Rows {
			for i, c := range r {
				rec[i] = gridCell(c, format1(g.Columns[i]), csvCells)
			}
			cw.Write(rec)
		}
		cw.Flush()
		if err := cw.Error(); err != nil {
			return err
		}
	case JSON:
		bw.WriteString("[")
		for k, r := range g.Rows {
			if k > 0 {
				bw.WriteString(",")
			}
			bw.WriteString("\n  {")
			for i, c := range r {
				if i > 0 {
					bw.WriteString(", ")
				}
				bw.WriteString(jsonString(g.Columns[i].Name) + ": ")
				switch {
				case c.Missing:
					bw.WriteString("null")
				case c.IsNum:
					bw.WriteString(jsonNumber(format1(g.Columns[i]), c.Num))
				default:
					bw.WriteString(jsonString(c.Text))
				}
			}
			bw.WriteString("}")
		}
		if len(g.Rows) > 0 {
			bw.WriteString("\n")
		}
		bw.WriteString("]\n")
	case Markdown:
		line := func(cells []string) {
			bw.WriteString("|")
			for _, c := range cells {
				bw.WriteString(" " + c + " |")
			}
			bw.WriteString("\n")
		}
		cells := make([]string, len(g.Columns))
		for i, c := range g.Columns {
			cells[i] = escapeMarkdown(c.Plain)
		}
		line(cells)
		for i, c := range g.Columns {
			cells[i] = ":---"
			if c.Numeric {
				cells[i] = "---:"
			}
		}
		line(cells)
		for _, r := range g.Rows {
			for i, c := range r {
				cells[i] = gridCell(c, format1(g.Columns[i]), markdownCells)
			}
			line(cells)
		}
	case LaTeX:
		var spec strings.Builder
		cells := make([]string, len(g.Columns))
		for i, c := range g.Columns {
			if c.Numeric {
				spec.WriteByte('r')
			} else {
				spec.WriteByte('l')
			}
			cells[i] = c.LaTeX
		}
		bw.WriteString(`\begin{tabular}{` + spec.String() + "}\n\\hline\n")
		bw.WriteString(strings.Join(cells, " & ") + " \\\\\n\\hline\n")
		for _, r := range g.Rows {
			for i, c := range r {
				if c.LaTeX != "" && !c.Missing {
					cells[i] = c.LaTeX
				} else {
					cells[i] = gridCell(c, format1(g.Columns[i]), latexCells)
				}
			}
			bw.WriteString(strings.Join(cells, " & ") + " \\\\\n")
		}
		bw.WriteString("\\hline\n\\end{tabular}\n")
	default:
		return fmt.Errorf("tables: unknown format %q (want %s)", format, strings.Join(Formats, ", "))
	}
	return bw.Flush()
}

func gridCell(c Cell, nf numberFormat, st cellStyle) string {
	switch {
	case c.Missing:
		return st.missing
	case c.IsNum:
		if nf.digits == 0 && c.Num == float64(int64(c.Num)) {
			return strconv.FormatInt(int64(c.Num), 10)
		}
		return st.number(nf, c.Num)
	}
	return st.text(c.Text)
}

// cellStyle is how one format writes a grid cell: a missing value, a
// number and text.
type cellStyle struct {
	missing string
	number  func(f numberFormat, x float64) string
	text    func(string) string
}

var (
	csvCells      = cellStyle{"", numberFormat.machine, func(s string) string { return s }}
	markdownCells = cellStyle{"—", numberFormat.plain, escapeMarkdown}
	latexCells    = cellStyle{"---", numberFormat.latex, escapeLaTeX}
)
