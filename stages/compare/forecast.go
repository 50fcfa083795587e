package compare

import (
	"fmt"
	"math"
)

// Forecast is a planned experiment's sensitivity to r: the one-sigma
// uncertainty sigma(r) forecast for a fiducial r = 0.
type Forecast struct {
	Name     string  // the experiment or configuration
	Citation string  // where the forecast is published
	SigmaR   float64 // one-sigma uncertainty on r at fiducial r = 0
}

// Check refuses a forecast without a name or citation or with a
// non-positive or non-finite sigma(r).
func (f Forecast) Check() error {
	switch {
	case f.Name == "":
		return fmt.Errorf("forecast: missing name")
	case f.Citation == "":
		return fmt.Errorf("forecast %s: missing citation", f.Name)
	case !(f.SigmaR > 0) || math.IsInf(f.SigmaR, 0):
		return fmt.Errorf("forecast %s: sigma(r) = %g, want > 0", f.Name, f.SigmaR)
	}
	return nil
}

// Significance returns the detection significance r/sigma(r) of a true
// tensor-to-scalar ratio r, in standard deviations. It takes sigma(r) at
// its r = 0 value for every r, unscaled: none of the shipped forecasts
// publishes sigma(r) as a function of the fiducial r. For r comparable to
// sigma(r) or larger the sample variance of the B modes themselves raises
// sigma(r), so this is an upper bound there (common practice).
func (f Forecast) Significance(r float64) float64 { return r / f.SigmaR }

// Detects reports whether r would be detected at k standard deviations or
// more, r/sigma(r) >= k.
func (f Forecast) Detects(r, k float64) bool { return f.Significance(r) >= k }
