package app

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/tables"
	"github.com/inflatrace/inflatrace/stages/study"
)

// Table writes rows under a header: aligned columns on a terminal,
// tab-separated values otherwise (for pipes and files).
func (e *Env) Table(w io.Writer, header []string, rows [][]string) error {
	return e.writeRows(w, append([][]string{header}, rows...))
}

// TableRows writes more rows of a table already started by Table (each
// chunk of a streamed run is aligned on its own on a terminal).
func (e *Env) TableRows(w io.Writer, rows [][]string) error {
	return e.writeRows(w, rows)
}

// writeRows writes rows in one buffered pass (a large scan prints a
// hundred thousand rows; one write call each would cost more than making
// them).
func (e *Env) writeRows(w io.Writer, rows [][]string) error {
	bw := bufio.NewWriterSize(w, 64<<10)
	var out io.Writer = bw
	var tw *tabwriter.Writer
	if e.StdoutTerminal {
		tw = tabwriter.NewWriter(bw, 0, 0, 2, ' ', 0)
		out = tw
	}
	for _, r := range rows {
		for i, c := range r {
			if i > 0 {
				io.WriteString(out, "\t")
			}
			io.WriteString(out, c)
		}
		io.WriteString(out, "\n")
	}
	if tw != nil {
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// JSON writes v as indented JSON.
func JSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// ResultHeader is the header of the results table; units are labelled.
// The first column, #, is the N of "trace RUN#N" (a failed result has
// none: "-"); label is the study's [[model]] label (the family when the
// study gives none).
var ResultHeader = []string{"#", "label", "model", "params", "reheating", "N*", "n_s", "r", "alpha_s", "n_t",
	"V*^1/4 [GeV]", "H* [GeV]", "constraint", "dchi2", "sigma"}

// ResultRows formats the results of one run, all of them, for
// ResultHeader.
func ResultRows(rs []study.Result) [][]string {
	var n ResultNumbering
	return n.Rows(rs)
}

// ResultNumbering numbers a run's results as RUN#N counts them while they
// arrive chunk by chunk: every result but a failed one (a failed node is
// never recorded as a result) takes the next number, from 1. The zero
// value starts at the run's first result.
type ResultNumbering struct {
	last int // the number of the last numbered result
}

// Rows formats the next results of the run for ResultHeader.
func (n *ResultNumbering) Rows(rs []study.Result) [][]string {
	rows := make([][]string, 0, len(rs))
	for _, r := range rs {
		history := r.Reheating
		if _, rest, ok := strings.Cut(r.Label, " | "); ok {
			history, _, _ = strings.Cut(rest, " | ") // the history as described, e.g. "w=0 T_reh=1e+09 GeV"
		}
		no := "-"
		if r.Error == "" {
			n.last++
			no = strconv.Itoa(n.last)
		}
		row := make([]string, 0, 15)
		row = append(row, no, tables.ModelLabel(r), r.Model, FormatParams(r.Params), history)
		if r.Error != "" {
			row = append(row, "failed: "+r.Error)
			rows = append(rows, row)
			continue
		}
		if b := r.Band; b != nil {
			row = append(row, fmt.Sprintf("%.2f..%.2f", b.NStar[0], b.NStar[1]), fmt.Sprintf("%.5f..%.5f", b.Ns[0], b.Ns[1]),
				fmt.Sprintf("%.4g..%.4g", b.R[0], b.R[1]), "-", "-", "-", "-", "-", "-", "-")
			rows = append(rows, row)
			continue
		}
		row = append(row,
			fixed(r.NStar, 2), fixed(r.Ns, 5), general(r.R, 4),
			general(r.AlphaS, 3), general(r.Nt, 3),
			optNum(r.EnergyScaleGeV, 'g', 4), optNum(r.HStarGeV, 'g', 4),
			r.Constraint, optNum(r.DeltaChi2, 'f', 2), optNum(r.NSigma, 'f', 2))
		rows = append(rows, row)
	}
	return rows
}

// fixed and general print x as fmt's %.{prec}f and %.{prec}g do (the same
// text: TestNumberFormats), without fmt's cost, which a warm re-run of a
// large scan printing its table would feel.
func fixed(x float64, prec int) string   { return strconv.FormatFloat(x, 'f', prec, 64) }
func general(x float64, prec int) string { return strconv.FormatFloat(x, 'g', prec, 64) }

func optNum(x *float64, format byte, prec int) string {
	if x == nil {
		return "-"
	}
	return strconv.FormatFloat(*x, format, prec, 64)
}

// FormatParams writes parameters as "alpha=0.3333 n=1", sorted.
func FormatParams(p map[string]float64) string {
	if len(p) == 0 {
		return "-"
	}
	if len(p) == 1 {
		for n, x := range p {
			return n + "=" + general(x, 6)
		}
	}
	names := make([]string, 0, len(p))
	for n := range p {
		names = append(names, n)
	}
	sort.Strings(names)
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = n + "=" + general(p[n], 6)
	}
	return strings.Join(parts, " ")
}
