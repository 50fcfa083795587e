package tables

import (
	"fmt"
	"strings"

	"github.com/inflatrace/inflatrace/stages/study"
)

// Layouts of a results table.
const (
	// Wide writes one row per prediction (model, parameters, method,
	// reheating history) and one group of columns per constraint set and
	// per forecast it was compared with.
	Wide = "wide"
	// Long writes one row per result: a prediction and one set.
	Long = "long"
)

// Layouts lists the layouts, the default first.
var Layouts = []string{Wide, Long}

// set is a constraint set or a forecast that predictions were compared
// with.
type set struct {
	name     string
	forecast bool
}

// title is the set's group header: its name, marked when a forecast.
func (s set) title() string {
	if s.forecast {
		return s.name + " (forecast)"
	}
	return s.name
}

// sheetCol is one column of a written table: a column of the row's
// prediction (set < 0), or of its comparison with one set.
type sheetCol struct {
	column
	set     int    // index into sheet.sets, or -1
	setName string // the set's name where set >= 0
}

// key is the column's CSV header and JSON key: its name, and in the wide
// layout "name[set]" for a column of one set.
func (c sheetCol) key() string {
	if c.set < 0 {
		return c.name
	}
	return c.name + "[" + c.setName + "]"
}

// sheetRow is one row: a prediction and, in the wide layout, its result
// for each set it was compared with.
type sheetRow struct {
	first int          // position (from 0) of the row's first result among those given
	pred  study.Result // the prediction; in the wide layout labelled without its set
	bySet map[int]study.Result
}

// sheet is a table ready to write: its sets (wide layout), columns and rows.
type sheet struct {
	wide bool
	sets []set
	cols []sheetCol
	rows []sheetRow
}

// value is the cell of row in column c.
func (sh *sheet) value(c sheetCol, row sheetRow) cell {
	if c.set < 0 {
		return c.value(row.first, row.pred)
	}
	r, ok := row.bySet[c.set]
	if !ok {
		return cell{}
	}
	return c.value(row.first, r)
}

// setOf is the set a result was compared with: the constraint its compare
// node recorded or, for a result whose comparison did not run, the last
// part of a three-part label "prediction | history | set". ok is false
// for a result with no set (a reheating band).
func setOf(r study.Result) (s set, ok bool) {
	name := r.Constraint
	if name == "" {
		parts := strings.Split(r.Label, " | ")
		if len(parts) < 3 {
			return set{}, false
		}
		name = parts[len(parts)-1]
		if f, ok := strings.CutPrefix(name, "forecast "); ok {
			return set{f, true}, true
		}
		return set{name, false}, true
	}
	forecast := r.DetectionSigma != nil || strings.HasSuffix(r.Label, " | forecast "+name)
	return set{name, forecast}, true
}

// predictionLabel is r's label without the set it was compared with.
func predictionLabel(r study.Result, s set) string {
	suffix := " | " + s.name
	if s.forecast {
		suffix = " | forecast " + s.name
	}
	return strings.TrimSuffix(r.Label, suffix)
}

// build lays results out in a sheet of the given columns. In the long
// layout, default columns (defaults) of the comparison that no result
// gives a value are left out, as the wide layout leaves them out of every
// set.
func build(results []study.Result, cols []column, layout string, defaults bool) (*sheet, error) {
	switch layout {
	case "", Wide:
		return buildWide(results, cols), nil
	case Long:
		sh := &sheet{}
		for k, r := range results {
			sh.rows = append(sh.rows, sheetRow{first: k, pred: r})
		}
		for _, c := range cols {
			sc := sheetCol{column: c, set: -1}
			if defaults && c.compared && !sh.anyValue(sc) {
				continue
			}
			sh.cols = append(sh.cols, sc)
		}
		return sh, nil
	}
	return nil, &OptionError{"--layout", layout, fmt.Errorf("unknown layout (want %s)", strings.Join(Layouts, " or "))}
}

// buildWide groups results by prediction, in the order of their first
// result, and sets in the order they first appear. A prediction listed
// twice in a study gets a row for each time.
func buildWide(results []study.Result, cols []column) *sheet {
	sh := &sheet{wide: true}
	setIndex := map[set]int{}
	byLabel := map[string][]int{} // prediction label -> its rows
	for k, r := range results {
		s, ok := setOf(r)
		if !ok {
			sh.rows = append(sh.rows, sheetRow{first: k, pred: r})
			continue
		}
		si, seen := setIndex[s]
		if !seen {
			si = len(sh.sets)
			setIndex[s] = si
			sh.sets = append(sh.sets, s)
		}
		label := predictionLabel(r, s)
		placed := false
		for _, ri := range byLabel[label] {
			if _, taken := sh.rows[ri].bySet[si]; !taken {
				sh.rows[ri].bySet[si] = r
				placed = true
				break
			}
		}
		if !placed {
			p := r
			p.Label = label
			byLabel[label] = append(byLabel[label], len(sh.rows))
			sh.rows = append(sh.rows, sheetRow{first: k, pred: p, bySet: map[int]study.Result{si: r}})
		}
	}
	for _, c := range cols {
		if !c.compared {
			sh.cols = append(sh.cols, sheetCol{column: c, set: -1})
		}
	}
	for si, s := range sh.sets {
		for _, c := range cols {
			// The constraint column is the group's header here.
			if c.compared && c.name != "constraint" && sh.hasValue(c, si) {
				sh.cols = append(sh.cols, sheetCol{column: c, set: si, setName: s.name})
			}
		}
	}
	return sh
}

// hasValue reports whether some row has a value in column c of set si.
func (sh *sheet) hasValue(c column, si int) bool {
	for _, row := range sh.rows {
		if r, ok := row.bySet[si]; ok && c.value(row.first, r).ok {
			return true
		}
	}
	return false
}

// anyValue reports whether some row has a value in column c.
func (sh *sheet) anyValue(c sheetCol) bool {
	for _, row := range sh.rows {
		if sh.value(c, row).ok {
			return true
		}
	}
	return false
}

// resolve finds the column a --where or --sort names, among all columns
// (not only those written): a column of the prediction by its name, and
// in the wide layout a column of one set as "name[set]", or by its name
// alone when exactly one set gives it a value.
func (sh *sheet) resolve(name string) (sheetCol, error) {
	base, setName, hasSet := strings.Cut(name, "[")
	if hasSet {
		if !strings.HasSuffix(setName, "]") {
			return sheetCol{}, fmt.Errorf("column %q: want name[set]", name)
		}
		setName = strings.TrimSuffix(setName, "]")
	}
	cs, err := lookup([]string{base})
	if err != nil {
		return sheetCol{}, err
	}
	c := cs[0]
	if !sh.wide || !c.compared {
		if hasSet {
			return sheetCol{}, fmt.Errorf("column %q: only a comparison column (constraint, delta_chi2, n_sigma, inside_68, inside_95, detection_sigma, detected_5sigma, key) takes a set, and only in the wide layout", name)
		}
		return sheetCol{column: c, set: -1}, nil
	}
	if hasSet {
		for si, s := range sh.sets {
			if s.name == setName {
				return sheetCol{column: c, set: si, setName: s.name}, nil
			}
		}
		return sheetCol{}, fmt.Errorf("column %q: no set %q in these results (sets: %s)", name, setName, sh.setNames())
	}
	var found []sheetCol
	var names []string
	for si, s := range sh.sets {
		if sh.hasValue(c, si) {
			found = append(found, sheetCol{column: c, set: si, setName: s.name})
			names = append(names, c.name+"["+s.name+"]")
		}
	}
	switch len(found) {
	case 1:
		return found[0], nil
	case 0:
		return sheetCol{}, fmt.Errorf("column %q: no constraint set or forecast of these results gives it a value", name)
	}
	return sheetCol{}, fmt.Errorf("column %q: %d sets give it a value: name one (%s), or use --layout long", name, len(found), strings.Join(names, ", "))
}

func (sh *sheet) setNames() string {
	if len(sh.sets) == 0 {
		return "none"
	}
	names := make([]string, len(sh.sets))
	for i, s := range sh.sets {
		names[i] = s.name
	}
	return strings.Join(names, ", ")
}
