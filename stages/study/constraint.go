package study

import (
	"fmt"
	"io/fs"
	"math"
	"os"
	"path"
	"path/filepath"
	"sort"
	"strings"
	"sync"

	"github.com/pelletier/go-toml/v2"

	"github.com/inflatrace/inflatrace/configs"
	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
	"github.com/inflatrace/inflatrace/stages/nodes"
)

// constraintFile is the format of a constraint set file.
type constraintFile struct {
	Name     string `toml:"name"`
	Title    string `toml:"title"`
	Citation string `toml:"citation"`
	Ns       struct {
		Mean  *float64 `toml:"mean"`
		Sigma *float64 `toml:"sigma"`
	} `toml:"n_s"`
	R struct {
		Mean    *float64 `toml:"mean"`
		Sigma   *float64 `toml:"sigma"`
		Upper95 *float64 `toml:"upper_95"`
	} `toml:"r"`
	Approximation struct {
		Correlation float64 `toml:"correlation"`
	} `toml:"approximation"`
	Samples struct {
		File string `toml:"file"`
	} `toml:"samples"`
}

// SampleSet is a constraint given as samples of (n_s, r): a two-column
// text turned into a smooth density by a kernel density estimate.
type SampleSet struct {
	Name, Citation string
	Points         []compare.Point
}

// LoadSampleSet reads a constraint file whose [samples] table names a
// two-column file of (n_s, r) samples (relative to the constraint file).
// It returns ok = false for a file that is not a sample set.
func LoadSampleSet(file string) (SampleSet, bool, error) {
	data, err := os.ReadFile(file)
	if err != nil {
		return SampleSet{}, false, err
	}
	var cf constraintFile
	if err := toml.Unmarshal(data, &cf); err != nil || cf.Samples.File == "" {
		return SampleSet{}, false, nil
	}
	c := &parser{file: file}
	if err := c.decodeStrict(data, &cf); err != nil {
		return SampleSet{}, true, err
	}
	if cf.Name == "" || cf.Citation == "" {
		return SampleSet{}, true, c.errAt("name", "a sample set needs name and citation")
	}
	if cf.Ns.Mean != nil || cf.R.Mean != nil || cf.R.Upper95 != nil {
		return SampleSet{}, true, c.errAt("samples", "give samples or Gaussian numbers, not both")
	}
	sf := cf.Samples.File
	if !filepath.IsAbs(sf) {
		sf = filepath.Join(filepath.Dir(file), sf)
	}
	raw, err := os.ReadFile(sf)
	if err != nil {
		return SampleSet{}, true, c.errAt("samples.file", "%v", err)
	}
	pts, err := compare.ParseSamples(sf, raw)
	if err != nil {
		return SampleSet{}, true, err
	}
	if len(pts) < compare.MinSamples || len(pts) > compare.MaxKDESamples {
		return SampleSet{}, true, c.errAt("samples.file", "%d samples, want %d to %d", len(pts), compare.MinSamples, compare.MaxKDESamples)
	}
	return SampleSet{Name: cf.Name, Citation: cf.Citation, Points: pts}, true, nil
}

// ParseConstraint reads a constraint set: n_s as mean and 68% sigma; r as
// mean and sigma, or as a one-sided 95% upper limit (a half-normal peaked at
// zero with sigma = upper_95/1.959964); an optional correlation.
func ParseConstraint(file string, data []byte) (compare.Gaussian, error) {
	c := &parser{file: file}
	var cf constraintFile
	if err := c.decodeStrict(data, &cf); err != nil {
		return compare.Gaussian{}, err
	}
	if cf.Name == "" {
		return compare.Gaussian{}, c.errAt("name", "missing name")
	}
	if cf.Citation == "" {
		return compare.Gaussian{}, c.errAt("citation", "missing citation: every constraint set names its source")
	}
	if cf.Ns.Mean == nil || cf.Ns.Sigma == nil {
		return compare.Gaussian{}, c.errAt("n_s", "needs mean and sigma")
	}
	g := compare.Gaussian{Name: cf.Name, Citation: cf.Citation, MeanNs: *cf.Ns.Mean, SigmaNs: *cf.Ns.Sigma, Rho: cf.Approximation.Correlation}
	switch {
	case cf.R.Upper95 != nil && (cf.R.Mean != nil || cf.R.Sigma != nil):
		return compare.Gaussian{}, c.errAt("r", "give mean and sigma, or upper_95, not both")
	case cf.R.Upper95 != nil:
		if !(*cf.R.Upper95 > 0) {
			return compare.Gaussian{}, c.errAt("r.upper_95", "upper limit %g, want > 0", *cf.R.Upper95)
		}
		g.MeanR, g.SigmaR = 0, *cf.R.Upper95/compare.HalfNormal95
	case cf.R.Mean != nil && cf.R.Sigma != nil:
		g.MeanR, g.SigmaR = *cf.R.Mean, *cf.R.Sigma
	default:
		return compare.Gaussian{}, c.errAt("r", "needs mean and sigma, or upper_95")
	}
	if err := g.Check(); err != nil {
		return compare.Gaussian{}, &ConfigError{File: file, Msg: err.Error()}
	}
	if math.Abs(g.MeanNs-1) > 0.5 {
		return compare.Gaussian{}, c.errAt("n_s.mean", "n_s = %g is not plausible", g.MeanNs)
	}
	return g, nil
}

// LoadConstraint reads a constraint set file.
func LoadConstraint(file string) (compare.Gaussian, error) {
	data, err := os.ReadFile(file)
	if err != nil {
		return compare.Gaussian{}, err
	}
	return ParseConstraint(file, data)
}

// Shipped returns a constraint set shipped in configs/constraints by name.
func Shipped(name string) (compare.Gaussian, error) {
	data, err := fs.ReadFile(configs.Constraints, path.Join("constraints", name+".toml"))
	if err != nil {
		return compare.Gaussian{}, fmt.Errorf("no shipped constraint set %q (shipped: %s)", name, strings.Join(ShippedNames(), ", "))
	}
	g, err := ParseConstraint("configs/constraints/"+name+".toml", data)
	if err != nil {
		return g, err
	}
	if g.Name != name {
		return g, fmt.Errorf("configs/constraints/%s.toml names itself %q", name, g.Name)
	}
	return g, nil
}

// ShippedNames lists the shipped constraint sets.
func ShippedNames() []string {
	entries, _ := fs.ReadDir(configs.Constraints, "constraints")
	var names []string
	for _, e := range entries {
		if n, ok := strings.CutSuffix(e.Name(), ".toml"); ok {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return names
}

// OneDimensionalBound returns the one-dimensional 95% upper bound on r of
// the constraint described by a compare node's parameters (see
// compare.Comparison for the two readings): mean_r + 1.959964 sigma_r for
// a Gaussian set (the published upper_95, to rounding, for a one-sided
// limit), the 95% quantile of the samples' r for a sample set. ok is false
// for a forecast or parameters that describe no constraint.
func OneDimensionalBound(params pipeline.Values) (r95 float64, ok bool) {
	kind := ""
	if k, found := params["kind"]; found && k.Kind == pipeline.KindString {
		kind = k.Str
	}
	switch kind {
	case nodes.KindForecast:
		return 0, false
	case nodes.KindSamples:
		text, err := params.Text("samples")
		if err != nil {
			return 0, false
		}
		return sampleBound(text)
	}
	g, isGauss := nodes.GaussianFrom(params)
	if !isGauss || g.Check() != nil {
		return 0, false
	}
	return g.R95(), true
}

// sampleBounds remembers the bound of the last few sample texts: every
// point of a scan has its own compare node with the same samples.
var sampleBounds struct {
	sync.Mutex
	m map[string]float64
}

func sampleBound(text string) (float64, bool) {
	sampleBounds.Lock()
	defer sampleBounds.Unlock()
	if r95, ok := sampleBounds.m[text]; ok {
		return r95, true
	}
	pts, err := compare.ParseSamples("samples", []byte(text))
	if err != nil {
		return 0, false
	}
	if sampleBounds.m == nil || len(sampleBounds.m) >= 8 {
		sampleBounds.m = map[string]float64{}
	}
	r95 := compare.SampleR95(pts)
	sampleBounds.m[text] = r95
	return r95, true
}
