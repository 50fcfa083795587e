package infer

import (
	"fmt"
	"math"

	"github.com/inflatrace/inflatrace/stages/num/detmath"
)

// DetectionProbability is the probability that an experiment measuring r
// with Gaussian error sigma (its forecast sigma(r) at r = 0) finds r
// above nsig sigma when the true value is r: the measured value is
// N(r, sigma), so P = Phi(r/sigma - nsig) = erfc((nsig - r/sigma)/sqrt 2)/2
// (common practice for B-mode forecasts stated as sigma(r); the forecast
// sets name their own sigma and source).
func DetectionProbability(r, sigma, nsig float64) (float64, error) {
	if !(sigma > 0) || math.IsInf(sigma, 0) {
		return 0, fmt.Errorf("infer: sigma(r) = %g: want a positive finite value", sigma)
	}
	return 0.5 * detmath.Erfc((nsig-r/sigma)/math.Sqrt2), nil
}

// ExclusionProbability is the probability that the experiment, seeing no
// signal (a measurement of r = 0 with error sigma), excludes r at one
// sided confidence p (0.95): the indicator that r lies above the upper
// limit sqrt(2) erfinv(2p - 1) sigma. Averaged over a model's predictive
// r it is the share of the prediction such a null result would exclude.
func ExclusionProbability(r, sigma, p float64) (float64, error) {
	if !(sigma > 0) || math.IsInf(sigma, 0) {
		return 0, fmt.Errorf("infer: sigma(r) = %g: want a positive finite value", sigma)
	}
	if !(p > 0 && p < 1) {
		return 0, fmt.Errorf("infer: confidence %g: want 0 < p < 1", p)
	}
	if r > math.Sqrt2*detmath.Erfinv(2*p-1)*sigma {
		return 1, nil
	}
	return 0, nil
}

// Grade is the strength of evidence a Bayes factor carries on Jeffreys'
// scale: log10 B below 1/2 "barely worth mentioning", then "substantial",
// "strong" (from 1), "very strong" (from 3/2) and "decisive" (from 2)
// (Jeffreys 1939, Theory of Probability; the thresholds as the
// statlect.com entry "Jeffreys' scale of evidence" tabulates Jeffreys'
// original scale, a secondary source). The grade is for the model
// favoured: a negative ln B grades the evidence for the reference model.
func Grade(lnB float64) string {
	l := math.Abs(lnB) / math.Ln10
	switch {
	case l < 0.5:
		return "barely worth mentioning"
	case l < 1:
		return "substantial"
	case l < 1.5:
		return "strong"
	case l < 2:
		return "very strong"
	}
	return "decisive"
}
