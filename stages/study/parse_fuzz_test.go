package study

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/pelletier/go-toml/v2"

	"github.com/inflatrace/inflatrace/pipeline"
)

// Files a fuzzed study may name with file = "...": a Gaussian constraint
// set, a sample set with its samples, and a forecast.
var fuzzFiles = map[string]string{
	"gauss.toml":    "name = \"fuzz-gauss\"\ncitation = \"none\"\n[n_s]\nmean = 0.965\nsigma = 0.004\n[r]\nmean = 0.01\nsigma = 0.02\n[approximation]\ncorrelation = -0.2\n",
	"samples.toml":  "name = \"fuzz-samples\"\ncitation = \"none\"\n[samples]\nfile = \"samples.txt\"\n",
	"samples.txt":   fuzzSampleText(60),
	"forecast.toml": "name = \"fuzz-forecast\"\ncitation = \"none\"\nsigma_r = 0.002\nfiducial_r = 0\n",
}

// fuzzSampleText returns n rows of (n_s, r) samples with a covariance that
// is not singular.
func fuzzSampleText(n int) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "%.4f %.4f\n", 0.96+0.0001*float64(i%13), 0.001*float64(i%17))
	}
	return b.String()
}

// writeFuzzFiles writes fuzzFiles into a new directory and returns it.
func writeFuzzFiles(f *testing.F) string {
	dir := f.TempDir()
	for name, text := range fuzzFiles {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			f.Fatal(err)
		}
	}
	return dir
}

// localFileNames reports whether every constraint, sample and forecast
// file data names is a plain name inside the directory (so that the
// fuzzer never has the parser read a device such as /dev/zero, which
// would never end). Text that does not decode is kept: it fails before
// any file is read.
func localFileNames(data []byte) bool {
	var doc struct {
		Constraint []constraintRef `toml:"constraint"`
		Forecast   []constraintRef `toml:"forecast"`
		Samples    struct {
			File string `toml:"file"`
		} `toml:"samples"`
	}
	if toml.Unmarshal(data, &doc) != nil {
		return true
	}
	names := []string{doc.Samples.File}
	for _, r := range append(doc.Constraint, doc.Forecast...) {
		names = append(names, r.File)
	}
	for _, n := range names {
		if n != "" && (filepath.Base(n) != n || n == "." || n == ".." || strings.ContainsAny(n, `/\`)) {
			return false
		}
	}
	return true
}

// fuzzMaxPoints bounds the points of any range a fuzzed study may ask
// for. A model parameter's range costs its ends whatever its size, but a
// reheating key's range makes a history per point (held, with their
// cartesian product), and a range at MaxGridPoints there would stall the
// fuzzer.
const fuzzMaxPoints = 10_000

// smallRanges reports whether every range table in data asks for at most
// fuzzMaxPoints points. Text that does not decode is kept.
func smallRanges(data []byte) bool {
	var doc map[string]any
	if toml.Unmarshal(data, &doc) != nil {
		return true
	}
	var small func(v any) bool
	small = func(v any) bool {
		switch x := v.(type) {
		case map[string]any:
			if n, ok := x["points"].(int64); ok && n > fuzzMaxPoints {
				return false
			}
			for _, e := range x {
				if !small(e) {
					return false
				}
			}
		case []any:
			for _, e := range x {
				if !small(e) {
					return false
				}
			}
		case []map[string]any:
			for _, e := range x {
				if !small(e) {
					return false
				}
			}
		}
		return true
	}
	return small(doc)
}

// fuzzGraphNodes bounds the studies whose graph the fuzz target expands.
const fuzzGraphNodes = 2000

// FuzzParse checks Parse on arbitrary bytes. It never panics. An error is
// a *ConfigError naming the file, with a message, a line inside the text
// (or none) and, when it has no line, a key path or a complaint about the
// whole document. A study it accepts has finite numbers throughout (every
// history, slow-roll setting and model point), A_s in (0, 1), at least
// one history, constraint and model; parsing the same bytes again gives
// the same study; and the document decoded, rendered again by the TOML
// encoder and parsed gives the same expansion: the same histories,
// constraints, forecasts, model points and, for a small study, the same
// graph, node by node.
func FuzzParse(f *testing.F) {
	dir := writeFuzzFiles(f)
	head := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n[[constraint]]\nuse = \"cmb-combined-2025\"\n"
	for _, s := range []string{
		head + "[[model]]\nfamily = \"starobinsky\"\n",
		head + "[[model]]\nfamily = \"t-model\"\nalpha = {log = [0.01, 100], points = 5}\nn = {linear = [1, 2], points = 3}\n",
		head + "[[model]]\nfamily = \"t-model\"\ncombine = \"zip\"\nalpha = [1, 2, 3]\nn = [1, 2, 3]\n",
		head + "[[model]]\nfamily = \"e-model\"\nalpha = [\"1/3\", \"7/3\", \" 2 / 3 \", 0.1, 2, \"1e-3\"]\n",
		head + "[[model]]\npotential = \"phi^2 +* 3\"\nfield_range = [1, 10]\n",
		head + "[[model]]\nlabel = \"mine\"\npotential = \"(chi^2/(6*alpha))^n\"\nkinetic = \"1/(1 - chi^2/(6*alpha))^2\"\nfield = \"chi\"\ndomain = [-2.449489742783178, 2.449489742783178]\nfield_range = [0.001, 2.4494]\nalpha = 1\nn = 1\n",
		"[[reheating]]\nhistory = \"band\"\nw_reh_min = 0\nw_reh_max = \"1/3\"\nn_w = 3\nn_T = 3\n[[constraint]]\nfile = \"gauss.toml\"\n[[constraint]]\nfile = \"samples.toml\"\n[[forecast]]\nfile = \"forecast.toml\"\n[[forecast]]\nuse = \"litebird\"\n[[model]]\nfamily = \"power-law\"\np = 2\n",
		"[slow_roll]\nmethod = [\"first\", \"second\"]\nend = \"epsilon_H=1\"\nrtol = 1e-9\n[[reheating]]\nhistory = \"duration\"\nw_reh = [0, \"1/3\"]\nN_reh = 5\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\nfamily = \"starobinsky\"\n",
		"[slow_roll]\nend = \"field\"\nend_phi = 0.5\n[[reheating]]\nhistory = \"temperature\"\nw_reh = 0\nT_reh_GeV = 1e9\ng_s_reh = 100\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\nfamily = \"power-law\"\np = 2\nfield_range = [0.1, 30]\n",
		"[[reheating]]\nhistory = \"kination\"\nT_reh_GeV = nan\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\nfamily = \"starobinsky\"\n",
		head + "[[model]]\nfamily = \"t-model\"\nalpha = {linear = [\"1/0\", 1e308], points = 3}\n",
		head + "[[model]]\nfamily = \"t-model\"\nalpha = {linear = [-1e308, 1e308], points = 3}\n",
		head + "[[model]]\nfamily = \"t-model\"\nalpha = \"inf/1\"\n",
		head + "[[model]]\npotential = \"m*phi^2\"\nfield_range = [1, 30]\nm = {linear = [-1e308, 1e308], points = 3}\n",
		head + "[[model]]\npotential = \"phi^2\"\nkinetic = \"1\"\nfield_range = [1, 30]\norigin = \"inf/1\"\n",
		head + "[[model]]\nfamily = \"t-model\"\nlabel = \"\u03b1-attractor \u2603\"\nalpha = 1\n",
		head + "[[model]]\nfamily = \"t-model\"\nalpha = [" + strings.Repeat("1, ", 2000) + "1]\n",
		head + "[[model]]\nfamily = \"t-model\"\nalpha = " + strings.Repeat("[", 100) + "1" + strings.Repeat("]", 100) + "\n",
		"reheating = [{history = \"instantaneous\", g_reh = 0}]\nconstraint = [{use = \"nope\"}]\nmodel = [{family = \"starobinsky\"}]\n",
		"title = 1\n", "[[model]]\n[[model]]\n", "\xff\xfe", "",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if !localFileNames(data) || !smallRanges(data) {
			return
		}
		const file = "fuzz/study.toml"
		s, err := Parse(file, data, dir)
		if err != nil {
			checkConfigError(t, file, data, err)
			return
		}
		checkStudy(t, s)
		if !bytes.Equal(s.Text, data) || s.Hash() != pipeline.Sum(data) {
			t.Fatalf("the study keeps other bytes than it was given, or hashes them otherwise")
		}
		again, err := Parse(file, data, dir)
		if err != nil {
			t.Fatalf("the same bytes parsed a second time: %v", err)
		}
		sameStudy(t, "a second parse", s, again)

		var doc map[string]any
		if err := toml.Unmarshal(data, &doc); err != nil {
			t.Fatalf("Parse accepted a document the TOML decoder refuses: %v", err)
		}
		text, err := toml.Marshal(doc)
		if err != nil {
			return // not every decoded document can be written back
		}
		r, err := Parse(file, text, dir)
		if err != nil {
			t.Fatalf("the study rendered again does not parse: %v\n%s", err, text)
		}
		sameStudy(t, "the study rendered again", s, r)
	})
}

// checkConfigError checks that err from parsing data as file is a
// *ConfigError that locates its complaint.
func checkConfigError(t *testing.T, file string, data []byte, err error) {
	t.Helper()
	var ce *ConfigError
	if !errors.As(err, &ce) {
		t.Fatalf("error %T %v, want a *ConfigError", err, err)
	}
	lines := bytes.Count(data, []byte("\n")) + 1
	switch {
	case ce.File != file:
		t.Fatalf("error names file %q, want %q: %v", ce.File, file, err)
	case ce.Msg == "":
		t.Fatalf("error without a message: %+v", ce)
	case ce.Line < 0 || ce.Line > lines || ce.Column < 0:
		t.Fatalf("error at line %d, column %d of a %d-line text: %v", ce.Line, ce.Column, lines, err)
	case ce.Line == 0 && ce.Path == "" && !strings.HasPrefix(ce.Msg, "no ["):
		t.Fatalf("error names neither a line nor a key: %v", err)
	case !strings.HasPrefix(ce.Error(), file+":"):
		t.Fatalf("error %q does not start with the file name", ce.Error())
	}
}

// fuzzProbe returns the model points a fuzz target looks at: all of a
// small study, else the first and last few and one in the middle.
func fuzzProbe(n int) []int {
	if n <= 64 {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	return []int{0, 1, 2, n / 2, n - 3, n - 2, n - 1}
}

// checkStudy checks what any accepted study must satisfy.
func checkStudy(t *testing.T, s *Study) {
	t.Helper()
	if len(s.SlowRoll) == 0 || len(s.Histories) == 0 || len(s.Constraints)+len(s.SampleSets) == 0 || s.NumModels() < 1 {
		t.Fatalf("accepted a study with %d slow-roll methods, %d histories, %d constraint sets and %d models",
			len(s.SlowRoll), len(s.Histories), len(s.Constraints)+len(s.SampleSets), s.NumModels())
	}
	if !(s.As > 0 && s.As < 1) {
		t.Fatalf("accepted A_s = %g", s.As)
	}
	for i, sr := range s.SlowRoll {
		if err := finite(fmt.Sprintf("slow_roll[%d]", i), reflect.ValueOf(sr)); err != nil {
			t.Fatal(err)
		}
	}
	for i, h := range s.Histories {
		if err := finite(fmt.Sprintf("history[%d]", i), reflect.ValueOf(h)); err != nil {
			t.Fatal(err)
		}
	}
	for i, g := range s.Constraints {
		if err := g.Check(); err != nil {
			t.Fatalf("constraint[%d]: %v", i, err)
		}
	}
	for _, j := range fuzzProbe(s.NumModels()) {
		m := s.ModelAt(j)
		path := fmt.Sprintf("model point %d (%s)", j, m.Describe())
		if len(m.Params) != len(m.ParamText) || m.Label == "" {
			t.Fatalf("%s: %d parameters, %d texts, label %q", path, len(m.Params), len(m.ParamText), m.Label)
		}
		for n, x := range m.Params {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("%s: parameter %s = %v (written %q) is not finite", path, n, x, m.ParamText[n])
			}
		}
		for _, x := range m.FieldRange {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("%s: field range %v is not finite", path, m.FieldRange)
			}
		}
		if c := m.Custom; c != nil {
			for _, x := range []float64{c.SearchLo, c.SearchHi, c.Origin} {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Fatalf("%s: search range [%v, %v] or origin %v is not finite", path, c.SearchLo, c.SearchHi, c.Origin)
				}
			}
		}
	}
}

// finite returns an error naming the first float64 inside v that is NaN
// or infinite.
func finite(path string, v reflect.Value) error {
	switch v.Kind() {
	case reflect.Float64:
		if x := v.Float(); math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("%s = %v is not finite", path, x)
		}
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ {
			if err := finite(path+"."+v.Type().Field(i).Name, v.Field(i)); err != nil {
				return err
			}
		}
	case reflect.Map:
		it := v.MapRange()
		for it.Next() {
			if err := finite(fmt.Sprintf("%s[%v]", path, it.Key()), it.Value()); err != nil {
				return err
			}
		}
	case reflect.Slice, reflect.Array:
		for i := 0; i < v.Len(); i++ {
			if err := finite(fmt.Sprintf("%s[%d]", path, i), v.Index(i)); err != nil {
				return err
			}
		}
	case reflect.Pointer:
		if !v.IsNil() {
			return finite(path, v.Elem())
		}
	}
	return nil
}

// sameStudy checks that b, parsed from other text, expands as a does.
func sameStudy(t *testing.T, what string, a, b *Study) {
	t.Helper()
	for _, c := range []struct {
		name string
		x, y any
	}{
		{"title", a.Title, b.Title}, {"description", a.Description, b.Description},
		{"slow-roll settings", a.SlowRoll, b.SlowRoll}, {"A_s", a.As, b.As},
		{"histories", a.Histories, b.Histories}, {"constraints", a.Constraints, b.Constraints},
		{"sample sets", a.SampleSets, b.SampleSets}, {"forecasts", a.Forecasts, b.Forecasts},
		{"number of models", a.NumModels(), b.NumModels()},
	} {
		if !reflect.DeepEqual(c.x, c.y) {
			t.Fatalf("%s: %s %+v, want %+v", what, c.name, c.y, c.x)
		}
	}
	for _, j := range fuzzProbe(a.NumModels()) {
		if m, n := a.ModelAt(j), b.ModelAt(j); !reflect.DeepEqual(m, n) {
			t.Fatalf("%s: model point %d is %+v, want %+v", what, j, n, m)
		}
	}
	perModel := 3 * len(a.SlowRoll) * len(a.Histories) * (1 + len(a.Constraints) + len(a.SampleSets) + len(a.Forecasts))
	if a.NumModels() > fuzzGraphNodes/perModel {
		return
	}
	ga, err := a.Graph()
	if err != nil {
		t.Fatalf("an accepted study does not expand: %v", err)
	}
	gb, err := b.Graph()
	if err != nil {
		t.Fatalf("%s does not expand: %v", what, err)
	}
	if len(ga.Nodes) != len(gb.Nodes) || !reflect.DeepEqual(ga.Results, gb.Results) {
		t.Fatalf("%s: %d nodes and %d results, want %d and %d", what, len(gb.Nodes), len(gb.Results), len(ga.Nodes), len(ga.Results))
	}
	for i, n := range ga.Nodes {
		m := gb.Nodes[i]
		if n.Stage.Spec().Name != m.Stage.Spec().Name || n.Label != m.Label || !reflect.DeepEqual(n.Inputs, m.Inputs) || !reflect.DeepEqual(n.Params, m.Params) {
			t.Fatalf("%s: node %d is %s %q %v, want %s %q %v", what, i, m.Stage.Spec().Name, m.Label, m.Params, n.Stage.Spec().Name, n.Label, n.Params)
		}
	}
}

// TestFuzzFoundNonFiniteModelInputs: inputs FuzzParse found accepted with
// an infinite model parameter or origin. A family refuses an infinite
// parameter itself, but a user-written model has no declared range, so
// the study must refuse a range whose end is not finite or whose points
// overflow (b - a beyond the largest double), and a non-finite origin, at
// the line of the key that holds it.
func TestFuzzFoundNonFiniteModelInputs(t *testing.T) {
	head := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\npotential = \"m*phi^2\"\nfield_range = [1, 30]\n"
	cases := []struct {
		name, lines string
		path, msg   string
	}{
		{"linear range overflows", "m = {linear = [-1e308, 1e308], points = 3}", "model[0].m", "overflows double precision"},
		{"linear range to inf", "m = {linear = [1, inf], points = 3}", "model[0].m", "finite ends"},
		{"ratio end inf/1", "m = {linear = [\"inf/1\", 1], points = 2}", "model[0].m", "finite ends"},
		{"log range to nan", "m = {log = [1, nan], points = 2}", "model[0].m", "finite ends"},
		{"origin inf", "origin = inf\nm = 1", "model[0].origin", "want a finite value of phi"},
		{"origin ratio", "origin = \"-inf/2\"\nm = 1", "model[0].origin", "want a finite value of phi"},
		{"origin nan", "origin = nan\nm = 1", "model[0].origin", "want a finite value of phi"},
	}
	for _, c := range cases {
		_, err := Parse("u.toml", []byte(head+c.lines+"\n"), ".")
		var ce *ConfigError
		if !errors.As(err, &ce) {
			t.Errorf("%s: error %v, want a ConfigError", c.name, err)
			continue
		}
		if ce.Line != 9 || ce.Path != c.path || !strings.Contains(ce.Msg, c.msg) {
			t.Errorf("%s: %v; want line 9, %s, %q", c.name, err, c.path, c.msg)
		}
	}
	// A range whose points stay finite is still read as before.
	s, err := Parse("u.toml", []byte(head+"m = {linear = [-1e307, 1e307], points = 3}\n"), ".")
	if err != nil {
		t.Fatal(err)
	}
	if m := s.ModelAt(1).Params["m"]; m != 0 {
		t.Errorf("midpoint of [-1e307, 1e307] = %v, want 0", m)
	}
}
