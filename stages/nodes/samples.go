package nodes

import (
	"fmt"
	"strings"
	"sync"

	"github.com/inflatrace/inflatrace/pipeline"
	"github.com/inflatrace/inflatrace/stages/compare"
)

// KindSamples is a comparison with a constraint given as samples of
// (n_s, r), smoothed by a kernel density estimate.
const KindSamples = "samples"

// SamplesText writes samples in the canonical two-column form that enters
// the compare node's parameters (floats in shortest round-trip form), so
// that the key captures every sample.
func SamplesText(pts []compare.Point) string {
	var b strings.Builder
	for _, p := range pts {
		b.WriteString(pipeline.FormatFloat(p.Ns) + " " + pipeline.FormatFloat(p.R) + "\n")
	}
	return b.String()
}

// SamplesParams returns the compare parameters for a sample-based set.
func SamplesParams(name, citation string, pts []compare.Point) pipeline.Values {
	return pipeline.Values{
		"constraint": pipeline.String(name),
		"citation":   pipeline.String(citation),
		"kind":       pipeline.String(KindSamples),
		"samples":    pipeline.String(SamplesText(pts)),
	}
}

// kdeCache holds density estimates by their samples' text: building one
// costs n^2 kernel evaluations and every comparison with the same set
// would otherwise repeat it. The estimate is a pure function of the text,
// so caching cannot change a result.
var kdeCache sync.Map // string -> *kdeEntry

type kdeEntry struct {
	once sync.Once
	kde  *compare.KDE
	err  error
}

func kdeFor(name, citation, text string) (*compare.KDE, error) {
	v, _ := kdeCache.LoadOrStore(pipeline.Sum([]byte(name+"\n"+text)), &kdeEntry{})
	e := v.(*kdeEntry)
	e.once.Do(func() {
		pts, err := compare.ParseSamples("constraint "+name, []byte(text))
		if err != nil {
			e.err = err
			return
		}
		e.kde, e.err = compare.NewKDE(name, citation, pts)
	})
	if e.err != nil {
		return nil, fmt.Errorf("constraint %s: %w", name, e.err)
	}
	return e.kde, nil
}

// ConstraintFrom reads the constraint a compare node used back from its
// parameters: a compare.Gaussian, or a *compare.KDE for a sample-based
// set. A forecast node gives false (see ForecastFrom).
func ConstraintFrom(params pipeline.Values) (compare.Constraint, bool, error) {
	switch text(params, "kind") {
	case KindForecast:
		return nil, false, nil
	case KindSamples:
		name, _ := params.Text("constraint")
		citation, _ := params.Text("citation")
		samples, _ := params.Text("samples")
		k, err := kdeFor(name, citation, samples)
		if err != nil {
			return nil, false, err
		}
		return k, true, nil
	}
	g, ok := GaussianFrom(params)
	return g, ok, nil
}

// ForecastFrom reads a forecast back from a compare node's parameters.
func ForecastFrom(params pipeline.Values) (compare.Forecast, bool) {
	if text(params, "kind") != KindForecast {
		return compare.Forecast{}, false
	}
	var f compare.Forecast
	f.Name, _ = params.Text("constraint")
	f.Citation, _ = params.Text("citation")
	f.SigmaR, _ = params.Num("sigma_r")
	return f, true
}
