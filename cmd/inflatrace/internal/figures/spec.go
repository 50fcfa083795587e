package figures

import (
	"image/color"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// Scale is an axis scale.
type Scale int

// Axis scales.
const (
	Linear Scale = iota
	Log
)

// DefaultRCut is the lower end of a logarithmic r axis when there is
// nothing to fit it to (no prediction with r > 0): the targets of planned
// experiments lie between 1e-3 and 1e-2.
const DefaultRCut = 1e-4

// ConstraintLayer is one constraint set drawn as its 68.27% region
// (filled, with a solid outline) and its 95.45% region (a dashed outline,
// unfilled), each with an entry in the key.
type ConstraintLayer struct {
	Set   compare.Constraint // compare.Gaussian, *compare.Gaussian or *compare.KDE
	Label string             // key text (plain); empty means Set.Label()
	Color color.Color        // nil picks from the palette
}

// Curve is a model's predictions: points in order, optionally joined.
// Join them along N* (same model and method, different N*) or along a
// scanned parameter (same model and history, different parameter value):
// CurvesAlong builds either from results.
type Curve struct {
	Label   string          // key text (typeset markup); empty means no key entry
	Points  []compare.Point // in drawing order
	Markers []Marker        // the glyph at each point; nil: Marker at every point
	Join    bool            // draw a line through the points in order
	Marker  Marker          // glyph at each point when Markers is nil
	Style   int             // line style: the Style-th colour and dash (curveStyle)
	Color   color.Color     // overrides the style's colour when set
}

// MarkerLabel says in the key what a marker shape stands for
// ("$N_* = 50$", "instantaneous reheating").
type MarkerLabel struct {
	Marker Marker
	Label  string // typeset markup
}

// Stripe is a reheating band drawn as a translucent fill.
//
// For a model scanned over a parameter, the band of each parameter value
// is a segment of its (n_s(N), r(N)) curve between N*_min and N*_max, and
// together they fill the stripe between two edges: Lower holds the
// predictions at one end of the N* span for each scanned value and Upper
// those at the other end, in the same order. The polygon is Lower followed
// by Upper reversed.
//
// For a single model, give Path instead: points along its curve from
// N*_min to N*_max, drawn as a thick translucent line.
type Stripe struct {
	Label        string          // key text (typeset markup); empty means no key entry
	Lower, Upper []compare.Point // the two edges of a scanned model's stripe
	Path         []compare.Point // a single model's band along its curve
	Style        int             // colour of the Style-th model (curveStyle)
	Color        color.Color     // overrides the style's colour when set
}

// NsRSpec describes the n_s-r figure. Layers are drawn in the order
// constraints, stripes, forecast levels, curves.
type NsRSpec struct {
	Title       string            // figure title (typeset markup)
	RScale      Scale             // Linear (from r = 0) or Log
	NsRange     [2]float64        // n_s axis range; zero means fit to the content
	RRange      [2]float64        // r axis range; zero means fit to the content
	Constraints []ConstraintLayer // drawn first, in order
	Stripes     []Stripe          // reheating bands, over the constraints
	Curves      []Curve           // model predictions, on top
	Markers     []MarkerLabel     // what the curves' marker shapes stand for
	Forecasts   []ForecastLine    // detection levels, as horizontal lines
	Grid        int               // nodes a side of a KDE set's density grid; 0 means DefaultGrid
}

// DefaultGrid is the number of grid nodes a side on which a KDE
// constraint's density is evaluated for its contours.
const DefaultGrid = 100

// XYCurve is a curve of r against a scanned parameter, optionally joined.
type XYCurve struct {
	Label   string    // key text (typeset markup); empty means no key entry
	X, R    []float64 // the scanned value (as plotted, e.g. 3 alpha) and r, pairwise
	Join    bool      // draw a line through the points in order
	Markers []Marker  // the glyph at each point; nil: Marker at every point
	Marker  Marker    // glyph at each point when Markers is nil
	Style   int       // line style index (curveStyle)
	Color   color.Color
}

// ForecastLine is a horizontal line at r = K sigma(r) of a planned
// experiment: above it that experiment would detect r at K standard
// deviations or more (compare.Forecast.Significance), the rule the key
// states.
type ForecastLine struct {
	Forecast compare.Forecast // the experiment and its sigma(r)
	K        float64          // multiple of sigma(r); 0 means DetectionSigmas
	Label    string           // key text; empty means "<name>: r > K sigma(r) = <value>"
	Color    color.Color      // nil means dark grey
}

// DetectionSigmas is the significance a forecast line marks by default:
// above it the experiment detects r at 3 sigma (common practice for an
// "evidence" level).
const DetectionSigmas = 3

// RAlphaSpec describes the figure of r against a scanned parameter such as
// 3 alpha, on a logarithmic r axis.
type RAlphaSpec struct {
	Title     string         // figure title (typeset markup)
	XLabel    string         // typeset markup; empty means "$3\alpha$"
	XScale    Scale          // Linear or Log
	XRange    [2]float64     // zero means fit to the content
	RRange    [2]float64     // zero means fit to the content (and the forecast lines)
	Curves    []XYCurve      // predictions
	Markers   []MarkerLabel  // what the curves' marker shapes stand for
	Forecasts []ForecastLine // horizontal detection levels
}
