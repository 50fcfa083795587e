package study

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/pelletier/go-toml/v2"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/expr"
	"github.com/inflatrace/inflatrace/stages/model"
	"github.com/inflatrace/inflatrace/stages/nodes"
	"github.com/inflatrace/inflatrace/stages/reheat"
)

// fileConfig is the document's shape. Model tables are decoded loosely
// (their keys include the family's own parameters) and checked by hand.
type fileConfig struct {
	Title         string           `toml:"title"`
	Description   string           `toml:"description"`
	SlowRoll      *slowRollConfig  `toml:"slow_roll"`
	Normalisation *normConfig      `toml:"normalisation"`
	Reheating     []map[string]any `toml:"reheating"`
	Constraint    []constraintRef  `toml:"constraint"`
	Forecast      []constraintRef  `toml:"forecast"`
	Model         []map[string]any `toml:"model"`
	Inference     []map[string]any `toml:"inference"`
}

type slowRollConfig struct {
	Method any `toml:"method"` // a method or a list of methods

	End         string   `toml:"end"`
	EndPhi      *float64 `toml:"end_phi"`
	RTol        *float64 `toml:"rtol"`
	ATol        *float64 `toml:"atol"`
	DepthIn     *float64 `toml:"depth_in"`
	DepthOut    *float64 `toml:"depth_out"`
	StepLnK     *float64 `toml:"step_lnk"`
	EarlyEfolds *float64 `toml:"early_efolds"`
}

type normConfig struct {
	As *float64 `toml:"A_s"`
}

type constraintRef struct {
	Use  string `toml:"use"`
	File string `toml:"file"`
}

// ModelSpec is one fully expanded model of a study.
type ModelSpec struct {
	Family     string
	Label      string             // the user's label, or the family name
	Params     map[string]float64 // family parameters
	ParamText  map[string]string  // each parameter as written ("1/3")
	FieldRange []float64          // nil for the family's default
	// Custom is set for a user-written model (Family is "custom").
	Custom *nodes.Custom
}

// Describe returns "label(alpha=1/3, n=1)" with parameters as written.
func (m ModelSpec) Describe() string {
	names := make([]string, 0, len(m.Params))
	for n := range m.Params {
		names = append(names, n)
	}
	sort.Strings(names)
	parts := make([]string, len(names))
	for i, n := range names {
		parts[i] = n + "=" + m.ParamText[n]
	}
	if len(parts) == 0 {
		return m.Label
	}
	return m.Label + "(" + strings.Join(parts, ", ") + ")"
}

// HistorySpec is one reheating history of a study (one node's worth: list
// values have been fanned out).
type HistorySpec struct {
	nodes.HistoryParams
}

// Describe returns a short label: "N*=55", "instantaneous",
// "w=0 T_reh=1e+09 GeV", ...
func (h HistorySpec) Describe() string {
	g := pipeline.FormatFloat
	switch h.Kind {
	case nodes.HistoryFixed:
		return "N*=" + g(h.N)
	case nodes.HistoryTemperature:
		return "w=" + g(h.W) + " T_reh=" + g(h.TRehGeV) + " GeV"
	case nodes.HistoryDuration:
		return "w=" + g(h.W) + " N_reh=" + g(h.NReh)
	case nodes.HistoryKination:
		return "kination T_reh=" + g(h.TRehGeV) + " GeV"
	case nodes.HistoryBand:
		return "band w in [" + g(h.Band.WMin) + ", " + g(h.Band.WMax) + "]"
	}
	return h.Kind
}

// Study is a checked, expanded configuration.
type Study struct {
	File        string // path as given
	Text        []byte // the exact bytes read
	Title       string
	Description string
	SlowRoll    []nodes.SlowRollParams // one slow-roll solution per method
	As          float64
	Histories   []HistorySpec
	Constraints []compare.Gaussian
	SampleSets  []SampleSet
	Forecasts   []compare.Forecast
	// Inferences are the [[inference]] tables (inflatrace infer).
	Inferences []Inference
	// The model points, expanded on demand (see NumModels and ModelAt).
	points modelPoints
	// wk caches the shared part of the work keys of the study's chunks.
	wk *workCache
}

// Hash is the prefixed SHA-256 of the configuration's bytes.
func (s *Study) Hash() string { return pipeline.Sum(s.Text) }

// Load reads and checks a configuration file. Constraint files named in it
// are resolved relative to its directory.
func Load(path string) (*Study, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("read config: %w", err)
	}
	return Parse(path, data, filepath.Dir(path))
}

type parser struct {
	file    string
	dir     string
	pos     positions
	samples []SampleSet // sample-based constraint sets met so far
}

// Parse checks a configuration given as bytes; file names it in errors and
// dir resolves relative constraint files.
func Parse(file string, data []byte, dir string) (*Study, error) {
	c := &parser{file: file, dir: dir}
	var fc fileConfig
	if err := c.decodeStrict(data, &fc); err != nil {
		return nil, err
	}
	s := &Study{File: file, Text: data, Title: fc.Title, Description: fc.Description, As: reheat.DefaultAs}
	methods := []string{nodes.MethodFirst}
	if fc.SlowRoll != nil && fc.SlowRoll.Method != nil {
		var err error
		if methods, err = c.strings("slow_roll.method", fc.SlowRoll.Method); err != nil {
			return nil, err
		}
	}
	for _, m := range methods {
		sp := nodes.SlowRollParams{Method: m, Exact: map[string]float64{}}
		if err := c.slowRoll(fc.SlowRoll, &sp); err != nil {
			return nil, err
		}
		s.SlowRoll = append(s.SlowRoll, sp)
	}
	if fc.Normalisation != nil && fc.Normalisation.As != nil {
		s.As = *fc.Normalisation.As
		if !(s.As > 0 && s.As < 1) {
			return nil, c.errAt("normalisation.A_s", "A_s = %g, want 0 < A_s < 1", s.As)
		}
	}
	var err error
	// A study of inferences alone states its reheating priors in them.
	if len(fc.Reheating) > 0 || len(fc.Model) > 0 || len(fc.Inference) == 0 {
		if s.Histories, err = c.histories(fc.Reheating); err != nil {
			return nil, err
		}
	}
	if s.Constraints, err = c.constraints(fc.Constraint); err != nil {
		return nil, err
	}
	s.SampleSets = c.samples
	if s.Forecasts, err = c.forecasts(fc.Forecast); err != nil {
		return nil, err
	}
	if s.Inferences, err = c.inferences(fc.Inference, s.Constraints); err != nil {
		return nil, err
	}
	if len(fc.Model) == 0 && len(s.Inferences) > 0 {
		// A study of inferences alone: nothing to predict point by point.
		s.points = newModelPoints(nil)
		return s, nil
	}
	groups, err := c.models(fc.Model)
	if err != nil {
		return nil, err
	}
	s.points = newModelPoints(groups)
	return s, nil
}

// strings reads a string or a non-empty list of distinct strings.
func (c *parser) strings(path string, v any) ([]string, error) {
	if s, ok := v.(string); ok {
		return []string{s}, nil
	}
	list, ok := v.([]any)
	if !ok || len(list) == 0 {
		return nil, c.errAt(path, "want a string or a non-empty list of strings")
	}
	seen := map[string]bool{}
	var out []string
	for _, e := range list {
		s, ok := e.(string)
		if !ok || seen[s] {
			return nil, c.errAt(path, "want a list of distinct strings")
		}
		seen[s] = true
		out = append(out, s)
	}
	return out, nil
}

// slowRoll reads the rest of the [slow_roll] table for sp.Method.
func (c *parser) slowRoll(sc *slowRollConfig, sp *nodes.SlowRollParams) error {
	sp.End = nodes.DefaultEnd(sp.Method)
	if sc != nil && sc.End != "" {
		sp.End = sc.End
	}
	if sc != nil {
		if sc.EndPhi != nil {
			if sp.End != nodes.EndField {
				return c.errAt("slow_roll.end_phi", "end_phi is only used with end = %q", nodes.EndField)
			}
			if math.IsNaN(*sc.EndPhi) || math.IsInf(*sc.EndPhi, 0) {
				return c.errAt("slow_roll.end_phi", "end_phi = %g, want a finite field value [M_p]", *sc.EndPhi)
			}
			sp.EndPhi = *sc.EndPhi
		} else if sp.End == nodes.EndField {
			return c.errAt("slow_roll.end", "end = %q needs end_phi (the field value [M_p] where inflation ends)", nodes.EndField)
		}
		for _, f := range []struct {
			key string
			v   *float64
		}{{"rtol", sc.RTol}, {"atol", sc.ATol}, {"depth_in", sc.DepthIn}, {"depth_out", sc.DepthOut}, {"step_lnk", sc.StepLnK}, {"early_efolds", sc.EarlyEfolds}} {
			if f.v == nil {
				continue
			}
			if sp.Method == nodes.MethodFirst && sp.End != nodes.EndEpsilonHOne {
				continue // a setting of the exact background, which first order integrates only to end at epsilon_H = 1
			}
			if !(*f.v > 0) || math.IsInf(*f.v, 0) {
				return c.errAt("slow_roll."+f.key, "%s = %g, want a positive finite number", f.key, *f.v)
			}
			sp.Exact[f.key] = *f.v
		}
	}
	if err := sp.Check(); err != nil {
		path := "slow_roll.end"
		if !strings.Contains(err.Error(), "end") {
			path = "slow_roll.method"
		}
		return c.errAt(path, "%v", err)
	}
	return nil
}

func (c *parser) decodeError(err error) error {
	var sm *toml.StrictMissingError
	if errors.As(err, &sm) && len(sm.Errors) > 0 {
		e := sm.Errors[0]
		line, col := e.Position()
		return &ConfigError{File: c.file, Line: line, Column: col, Path: strings.Join(e.Key(), "."),
			Msg: "unknown key (see README, \"Configuration\")"}
	}
	var de *toml.DecodeError
	if errors.As(err, &de) {
		line, col := de.Position()
		return &ConfigError{File: c.file, Line: line, Column: col, Path: strings.Join(de.Key(), "."),
			Msg: strings.TrimPrefix(de.Error(), "toml: ")}
	}
	return &ConfigError{File: c.file, Msg: err.Error()}
}

// number reads a TOML number or a string holding a rational "p/q".
func number(v any) (float64, string, error) {
	switch x := v.(type) {
	case int64:
		return float64(x), strconv.FormatInt(x, 10), nil
	case float64:
		return x, pipeline.FormatFloat(x), nil
	case string:
		t := strings.TrimSpace(x)
		if num, den, ok := strings.Cut(t, "/"); ok {
			p, err1 := strconv.ParseFloat(strings.TrimSpace(num), 64)
			q, err2 := strconv.ParseFloat(strings.TrimSpace(den), 64)
			if err1 != nil || err2 != nil || q == 0 {
				return 0, "", fmt.Errorf("%q is not a number or a ratio p/q", x)
			}
			return p / q, t, nil
		}
		f, err := strconv.ParseFloat(t, 64)
		if err != nil {
			return 0, "", fmt.Errorf("%q is not a number or a ratio p/q", x)
		}
		return f, t, nil
	}
	return 0, "", fmt.Errorf("want a number or a ratio such as \"1/3\", got %T", v)
}

// ParseNumber reads a number as a study writes one in text: a decimal
// ("0.5", "1e-3") or a ratio "p/q" ("1/3"), to the float64 the study
// computes from it (p/q divided in float64).
func ParseNumber(s string) (float64, error) {
	x, _, err := number(s)
	return x, err
}

// numbers reads a number or a non-empty list of numbers.
func numbers(v any) ([]float64, []string, error) {
	if t, ok := v.(map[string]any); ok {
		return grid(t)
	}
	list, ok := v.([]any)
	if !ok {
		list = []any{v}
	}
	if len(list) == 0 {
		return nil, nil, errors.New("empty list")
	}
	xs := make([]float64, len(list))
	ts := make([]string, len(list))
	for i, e := range list {
		x, t, err := number(e)
		if err != nil {
			return nil, nil, err
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, nil, fmt.Errorf("%s is not finite", t)
		}
		xs[i], ts[i] = x, t
	}
	return xs, ts, nil
}

var thermalKeys = []string{"k_pivot_per_Mpc", "T_0_K", "g_s0", "g_reh", "g_s_reh", "T_bbn_GeV"}

// Bounds on the reheating inputs of a study. Values outside them are
// refused as bad input (they are not numbers any history could produce):
//
//   - N_star: from MinNStar to MaxNStar e-folds. Inflation at the lowest
//     scale nucleosynthesis allows (V^(1/4) near 4 MeV), reheating at once,
//     puts the pivot about 14 e-folds before the end (N* is about
//     61.6 + ln(V^(1/4)/M_p) for instantaneous reheating), and a stiff era
//     (w_reh = 1) from the highest scale the r bound allows down to
//     nucleosynthesis adds about 14 to the 57 of that scale (N* grows by
//     (3w-1)/(12(1+w)) times the log of the density drop; common practice,
//     Liddle & Leach 2003, astro-ph/0305263), so physical values lie
//     between about 14 and 71. The bounds leave room
//     for scans beyond that (n_s against N* for a family), but below 5
//     e-folds the pivot would leave the horizon while the slow-roll
//     parameters are of order one, and above 200 it lies beyond the range
//     the built-in families search (at least 200 e-folds, DEVELOPERS.md).
//   - N_reh: at most MaxNReh. With w_reh > -1/3 the density falls at least
//     as fast as a^-2, so after N_reh e-folds it has fallen by e^(-2 N_reh)
//     or more. From the highest energy scale the tensor bound allows
//     (V*^(1/4) < 1.4e16 GeV for r < 0.036, BICEP/Keck 2021,
//     arXiv:2110.00483) to today's photon temperature (2.35e-13 GeV) the
//     density falls by e^(-265): no reheating era lasts more than 133
//     e-folds. 150 is the round number above that.
//   - T_reh_GeV and T_min_GeV: above the photon temperature today (T_0_K):
//     the plasma has never been colder than it is now.
//   - g_reh, g_s_reh, g_s0: at least MinDegrees. The smallest bath, one
//     real scalar, has g = 1 (a Weyl fermion counts 7/4).
//   - every value finite (TOML allows nan and inf; they are refused).
const (
	MinNStar   = 5.0
	MaxNStar   = 200.0
	MaxNReh    = 150.0
	MinDegrees = 1.0
)

func (c *parser) histories(tables []map[string]any) ([]HistorySpec, error) {
	if len(tables) == 0 {
		return nil, c.errAt("", "no [[reheating]] table: give at least one history (%s)", strings.Join(nodes.Histories, ", "))
	}
	var out []HistorySpec
	for i, t := range tables {
		path := fmt.Sprintf("reheating[%d]", i)
		kind, _ := t["history"].(string)
		own := map[string][]string{
			nodes.HistoryFixed:       {"N_star"},
			nodes.HistoryInstant:     {},
			nodes.HistoryTemperature: {"w_reh", "T_reh_GeV"},
			nodes.HistoryDuration:    {"w_reh", "N_reh"},
			nodes.HistoryKination:    {"T_reh_GeV"},
			nodes.HistoryBand:        {"w_reh_min", "w_reh_max", "n_w", "n_T", "T_min_GeV"},
		}
		keys, known := own[kind]
		switch {
		case kind == "":
			return nil, c.errAt(path, "missing history = \"...\" (known: %s)", strings.Join(nodes.Histories, ", "))
		case !known:
			return nil, c.errAt(path+".history", "unknown history %q (known: %s)", kind, strings.Join(nodes.Histories, ", "))
		}
		allowed := append([]string{"history"}, keys...)
		if kind != nodes.HistoryFixed {
			allowed = append(allowed, thermalKeys...)
		}
		if err := c.allowKeys(path, t, allowed...); err != nil {
			return nil, err
		}
		base := HistorySpec{nodes.HistoryParams{Kind: kind}}
		if kind != nodes.HistoryFixed {
			h := reheat.DefaultHistory()
			base.TBBNGeV = reheat.DefaultBBNBoundGeV
			_, hasGS := t["g_s_reh"]
			for _, f := range []struct {
				key string
				dst *float64
			}{{"k_pivot_per_Mpc", &h.PivotPerMpc}, {"T_0_K", &h.T0K}, {"g_s0", &h.GS0}, {"g_reh", &h.GReh}, {"g_s_reh", &h.GSReh}, {"T_bbn_GeV", &base.TBBNGeV}} {
				x, ok, err := c.positive(t, path, f.key)
				if err != nil {
					return nil, err
				}
				if ok && strings.HasPrefix(f.key, "g_") && x < MinDegrees {
					return nil, c.errAt(path+"."+f.key, "%s = %g: want at least %g (relativistic degrees of freedom; one real scalar counts 1)", f.key, x, MinDegrees)
				}
				if ok {
					*f.dst = x
				}
			}
			if !hasGS {
				h.GSReh = h.GReh
			}
			base.Thermal = h
		}
		// Today's photon temperature [GeV]: no reheating temperature lies
		// below it.
		t0GeV := reheat.KelvinInGeV(base.Thermal.T0K)
		// Each list-valued key fans out (cartesian product).
		combos := []HistorySpec{base}
		listed := func(key string, required bool, check func(float64) error, set func(*HistorySpec, float64)) error {
			v, ok := t[key]
			if !ok {
				if required {
					return c.errAt(path, "history %q needs %s", kind, key)
				}
				return nil
			}
			xs, _, err := numbers(v)
			if err != nil {
				return c.errAt(path+"."+key, "%v", err)
			}
			var next []HistorySpec
			for _, cb := range combos {
				for _, x := range xs {
					if err := check(x); err != nil {
						return c.errAt(path+"."+key, "%v", err)
					}
					n := cb
					set(&n, x)
					next = append(next, n)
				}
			}
			combos = next
			return nil
		}
		nstar := func(x float64) error {
			if !(x >= MinNStar && x <= MaxNStar) {
				return fmt.Errorf("N* = %g, want %g <= N* <= %g e-folds", x, MinNStar, MaxNStar)
			}
			return nil
		}
		wCheck := func(x float64) error {
			if !(x > -1.0/3 && x <= 1) {
				return fmt.Errorf("w_reh = %g: want -1/3 < w_reh <= 1 (w <= -1/3 would still inflate)", x)
			}
			return nil
		}
		tCheck := func(x float64) error {
			if !(x > t0GeV) || math.IsInf(x, 0) {
				return fmt.Errorf("T_reh = %g GeV: want a finite temperature above today's photon temperature (%.4g GeV)", x, t0GeV)
			}
			return nil
		}
		nReh := func(x float64) error {
			if !(x >= 0 && x <= MaxNReh) {
				return fmt.Errorf("N_reh = %g: want 0 <= N_reh <= %g e-folds", x, MaxNReh)
			}
			return nil
		}
		var err error
		switch kind {
		case nodes.HistoryFixed:
			err = listed("N_star", true, nstar, func(h *HistorySpec, x float64) { h.N = x })
		case nodes.HistoryTemperature:
			if err = listed("w_reh", true, wCheck, func(h *HistorySpec, x float64) { h.W = x }); err == nil {
				err = listed("T_reh_GeV", true, tCheck, func(h *HistorySpec, x float64) { h.TRehGeV = x })
			}
		case nodes.HistoryDuration:
			if err = listed("w_reh", true, wCheck, func(h *HistorySpec, x float64) { h.W = x }); err == nil {
				err = listed("N_reh", true, nReh, func(h *HistorySpec, x float64) { h.NReh = x })
			}
		case nodes.HistoryKination:
			err = listed("T_reh_GeV", true, tCheck, func(h *HistorySpec, x float64) { h.TRehGeV = x })
		case nodes.HistoryBand:
			b := &combos[0]
			b.Band = reheat.BandSettings{WMin: 0, WMax: 1.0 / 3, NW: 100, NT: 100}
			b.BandTGeV = b.TBBNGeV
			for _, f := range []struct {
				key string
				dst *float64
			}{{"w_reh_min", &b.Band.WMin}, {"w_reh_max", &b.Band.WMax}, {"T_min_GeV", &b.BandTGeV}} {
				if v, ok := t[f.key]; ok {
					x, _, e := number(v)
					if e != nil {
						return nil, c.errAt(path+"."+f.key, "%v", e)
					}
					if math.IsNaN(x) || math.IsInf(x, 0) {
						return nil, c.errAt(path+"."+f.key, "%s = %g: want a finite value", f.key, x)
					}
					*f.dst = x
				}
			}
			for _, f := range []struct {
				key string
				dst *int
			}{{"n_w", &b.Band.NW}, {"n_T", &b.Band.NT}} {
				if v, ok := t[f.key]; ok {
					n, isInt := v.(int64)
					if !isInt || n < 1 || n > 10000 {
						return nil, c.errAt(path+"."+f.key, "want an integer from 1 to 10000")
					}
					*f.dst = int(n)
				}
			}
			switch {
			case !(b.Band.WMin > -1.0/3) || b.Band.WMax > 1 || b.Band.WMin > b.Band.WMax:
				return nil, c.errAt(path, "band: want -1/3 < w_reh_min <= w_reh_max <= 1, got [%g, %g]", b.Band.WMin, b.Band.WMax)
			case !(b.BandTGeV > t0GeV):
				return nil, c.errAt(path+".T_min_GeV", "T_min_GeV = %g: want a temperature above today's photon temperature (%.4g GeV)", b.BandTGeV, t0GeV)
			}
		}
		if err != nil {
			return nil, err
		}
		out = append(out, combos...)
	}
	return out, nil
}

// positive reads an optional positive number.
func (c *parser) positive(t map[string]any, path, key string) (float64, bool, error) {
	v, ok := t[key]
	if !ok {
		return 0, false, nil
	}
	x, _, err := number(v)
	if err != nil {
		return 0, false, c.errAt(path+"."+key, "%v", err)
	}
	if !(x > 0) || math.IsInf(x, 0) {
		return 0, false, c.errAt(path+"."+key, "%g, want a positive finite value", x)
	}
	return x, true, nil
}

func (c *parser) allowKeys(path string, t map[string]any, allowed ...string) error {
	ok := map[string]bool{}
	for _, a := range allowed {
		ok[a] = true
	}
	var bad []string
	for k := range t {
		if !ok[k] {
			bad = append(bad, k)
		}
	}
	if len(bad) == 0 {
		return nil
	}
	sort.Strings(bad)
	return c.errAt(path+"."+bad[0], "unknown key %q (allowed: %s)", bad[0], strings.Join(allowed, ", "))
}

func (c *parser) constraints(refs []constraintRef) ([]compare.Gaussian, error) {
	if len(refs) == 0 {
		return nil, c.errAt("", "no [[constraint]] table: name at least one constraint set (use = \"name\" or file = \"path\")")
	}
	var out []compare.Gaussian
	seen := map[string]bool{}
	for i, r := range refs {
		path := fmt.Sprintf("constraint[%d]", i)
		var g compare.Gaussian
		var err error
		switch {
		case r.Use != "" && r.File != "":
			return nil, c.errAt(path, "give use or file, not both")
		case r.Use != "":
			if g, err = Shipped(r.Use); err != nil {
				return nil, c.errAt(path+".use", "%v", err)
			}
		case r.File != "":
			f := r.File
			if !filepath.IsAbs(f) {
				f = filepath.Join(c.dir, f)
			}
			if ss, isSamples, serr := LoadSampleSet(f); isSamples || serr != nil {
				if serr != nil {
					return nil, c.errAt(path+".file", "%v", serr)
				}
				if seen[ss.Name] {
					return nil, c.errAt(path, "constraint set %q named twice", ss.Name)
				}
				seen[ss.Name] = true
				c.samples = append(c.samples, ss)
				continue
			}
			if g, err = LoadConstraint(f); err != nil {
				return nil, c.errAt(path+".file", "%v", err)
			}
		default:
			return nil, c.errAt(path, "give use = \"name\" (one of %s) or file = \"path\"", strings.Join(ShippedNames(), ", "))
		}
		if seen[g.Name] {
			return nil, c.errAt(path, "constraint set %q named twice", g.Name)
		}
		seen[g.Name] = true
		out = append(out, g)
	}
	return out, nil
}

func (c *parser) forecasts(refs []constraintRef) ([]compare.Forecast, error) {
	var out []compare.Forecast
	seen := map[string]bool{}
	for i, r := range refs {
		path := fmt.Sprintf("forecast[%d]", i)
		var f compare.Forecast
		var err error
		switch {
		case r.Use != "" && r.File != "":
			return nil, c.errAt(path, "give use or file, not both")
		case r.Use != "":
			if f, err = ShippedForecast(r.Use); err != nil {
				return nil, c.errAt(path+".use", "%v", err)
			}
		case r.File != "":
			p := r.File
			if !filepath.IsAbs(p) {
				p = filepath.Join(c.dir, p)
			}
			data, rerr := os.ReadFile(p)
			if rerr != nil {
				return nil, c.errAt(path+".file", "%v", rerr)
			}
			if f, err = ParseForecast(p, data); err != nil {
				return nil, err
			}
		default:
			return nil, c.errAt(path, "give use = \"name\" (one of %s) or file = \"path\"", strings.Join(ForecastNames(), ", "))
		}
		if seen[f.Name] {
			return nil, c.errAt(path, "forecast %q named twice", f.Name)
		}
		seen[f.Name] = true
		out = append(out, f)
	}
	return out, nil
}

func (c *parser) models(tables []map[string]any) ([]*modelGroup, error) {
	if len(tables) == 0 {
		return nil, c.errAt("", "no [[model]] table: give at least one model")
	}
	var out []*modelGroup
	for i, t := range tables {
		path := fmt.Sprintf("model[%d]", i)
		if _, ok := t["potential"]; ok {
			g, err := c.customModels(path, t)
			if err != nil {
				return nil, err
			}
			out = append(out, g)
			continue
		}
		family, ok := t["family"].(string)
		if !ok || family == "" {
			return nil, c.errAt(path, "missing family = \"...\" (known: %s)", strings.Join(model.Names(), ", "))
		}
		fam, err := model.Lookup(family)
		if err != nil {
			return nil, c.errAt(path+".family", "%v", err)
		}
		label := family
		if l, ok := t["label"]; ok {
			s, ok := l.(string)
			if !ok || s == "" {
				return nil, c.errAt(path+".label", "label must be a non-empty string")
			}
			label = s
		}
		var fieldRange []float64
		if fr, ok := t["field_range"]; ok {
			xs, _, err := numbers(fr)
			if err != nil || len(xs) != 2 || !(xs[0] < xs[1]) {
				return nil, c.errAt(path+".field_range", "want [lo, hi] in M_p with lo < hi")
			}
			fieldRange = xs
		}
		declared := map[string]bool{}
		for _, p := range fam.Params {
			declared[p.Name] = true
		}
		var axes []axis
		var keys []string
		for k := range t {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			switch k {
			case "family", "label", "field_range", "combine":
				continue
			}
			if !declared[k] {
				allowed := strings.Join(fam.ParamNames(), ", ")
				if allowed == "" {
					allowed = "none"
				}
				return nil, c.errAt(path+"."+k, "unknown parameter %q for family %s (parameters: %s; other keys: family, label, field_range)", k, family, allowed)
			}
			a, err := axisValues(k, t[k])
			if err != nil {
				return nil, c.errAt(path+"."+k, "%v", err)
			}
			axes = append(axes, a)
		}
		combine := "product"
		if v, ok := t["combine"]; ok {
			combine, _ = v.(string)
			if combine != "product" && combine != "zip" {
				return nil, c.errAt(path+".combine", "combine = \"product\" (every combination) or \"zip\" (the i-th values together)")
			}
		}
		g, err := c.group(path, ModelSpec{Family: family, Label: label, FieldRange: fieldRange}, axes, combine == "zip", nil)
		if err != nil {
			return nil, err
		}
		// Check every value of every list, and each range by its ends and
		// the points next to them (which stand for the whole range:
		// valueRange.extremes), each with the other parameters at their
		// first values; fill the family's defaults from the first point and
		// check the field range there. The points themselves are made on
		// demand.
		check := func(m ModelSpec) (*model.Model, error) {
			full, err := fam.New(m.Params)
			if err != nil {
				var pe *model.ParamError
				if errors.As(err, &pe) && pe.Param != "" {
					if _, given := t[pe.Param]; given {
						return nil, c.errAt(path+"."+pe.Param, "%v", err)
					}
				}
				return nil, c.errAt(path, "%v", err)
			}
			return full, nil
		}
		if err := g.eachProbe(func(m ModelSpec) error {
			_, err := check(m)
			return err
		}); err != nil {
			return nil, err
		}
		full, err := check(g.at(0))
		if err != nil {
			return nil, err
		}
		g.defaults = map[string]float64{}
		for n, v := range full.Params {
			if !g.has(n) {
				g.defaults[n] = v
			}
		}
		if fieldRange != nil {
			if _, err := full.WithRange(fieldRange[0], fieldRange[1]); err != nil {
				return nil, c.errAt(path+".field_range", "%v", err)
			}
		}
		out = append(out, g)
	}
	return out, nil
}

// customModels reads a user-written model: potential (and optionally
// kinetic) as expressions of the field, its parameters (every other key,
// fanned out like a family's), the native domain and origin, and the range
// searched for inflation (required, in the field).
func (c *parser) customModels(path string, t map[string]any) (*modelGroup, error) {
	if _, ok := t["family"]; ok {
		return nil, c.errAt(path+".family", "give a family or a potential, not both")
	}
	str := func(key string) (string, error) {
		v, ok := t[key]
		if !ok {
			return "", nil
		}
		s, ok := v.(string)
		if !ok {
			return "", c.errAt(path+"."+key, "%s must be a string", key)
		}
		return s, nil
	}
	base := nodes.Custom{Field: "phi", DomainLo: math.Inf(-1), DomainHi: math.Inf(1)}
	var err error
	if base.Potential, err = str("potential"); err != nil {
		return nil, err
	}
	if base.Kinetic, err = str("kinetic"); err != nil {
		return nil, err
	}
	if f, err := str("field"); err != nil {
		return nil, err
	} else if f != "" {
		base.Field = f
	}
	label, err := str("label")
	if err != nil {
		return nil, err
	}
	if label == "" {
		label = nodes.CustomFamily
	}
	fr, ok := t["field_range"]
	if !ok {
		return nil, c.errAt(path, "a user-written model needs field_range = [lo, hi]: the range of %s searched for inflation", base.Field)
	}
	xs, _, err := numbers(fr)
	if err != nil || len(xs) != 2 || !(xs[0] < xs[1]) {
		return nil, c.errAt(path+".field_range", "want [lo, hi] with lo < hi")
	}
	base.SearchLo, base.SearchHi = xs[0], xs[1]
	if d, ok := t["domain"]; ok {
		ds, _, err := numbers(d)
		if err != nil || len(ds) != 2 || !(ds[0] < ds[1]) {
			return nil, c.errAt(path+".domain", "want [lo, hi] with lo < hi (the open domain of %s)", base.Field)
		}
		base.DomainLo, base.DomainHi = ds[0], ds[1]
	}
	if o, ok := t["origin"]; ok {
		x, _, err := number(o)
		if err != nil {
			return nil, c.errAt(path+".origin", "%v", err)
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, c.errAt(path+".origin", "origin = %g, want a finite value of %s", x, base.Field)
		}
		base.Origin = x
	}
	reserved := map[string]bool{"potential": true, "kinetic": true, "field": true, "label": true, "field_range": true, "domain": true, "origin": true, "combine": true}
	var axes []axis
	var keys []string
	for k := range t {
		if !reserved[k] {
			keys = append(keys, k)
		}
	}
	sort.Strings(keys)
	for _, k := range keys {
		a, err := axisValues(k, t[k])
		if err != nil {
			return nil, c.errAt(path+"."+k, "%v", err)
		}
		axes = append(axes, a)
	}
	comb, _ := t["combine"].(string)
	g, err := c.group(path, ModelSpec{Family: nodes.CustomFamily, Label: label, FieldRange: xs}, axes, comb == "zip", &base)
	if err != nil {
		return nil, err
	}
	// Names and syntax do not depend on the values: one compile checks all.
	if err := nodes.CompileCustom(*g.at(0).Custom); err != nil {
		key := "potential"
		if strings.HasPrefix(err.Error(), "kinetic") {
			key = "kinetic"
		}
		msg := err.Error()
		var se *expr.SyntaxError
		if errors.As(err, &se) {
			msg += "\n" + se.Caret()
		}
		return nil, c.errAt(path+"."+key, "%s", msg)
	}
	return g, nil
}

// group makes a model group, checking that zipped lists have one length.
func (c *parser) group(path string, base ModelSpec, axes []axis, zip bool, custom *nodes.Custom) (*modelGroup, error) {
	g := &modelGroup{base: base, axes: axes, zip: zip, custom: custom, n: 1}
	if zip {
		for _, a := range axes {
			if a.len() > 1 {
				if g.n > 1 && a.len() != g.n {
					return nil, c.errAt(path+"."+a.name, "combine = \"zip\" needs lists of one length: %s has %d values, another %d", a.name, a.len(), g.n)
				}
				g.n = a.len()
			}
		}
		return g, nil
	}
	for _, a := range axes {
		if g.n > MaxModelPoints/a.len() {
			return nil, c.errAt(path, "more than %d model points", MaxModelPoints)
		}
		g.n *= a.len()
	}
	return g, nil
}
