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

// DefaultRCut is the lower end of a logarithmic r axis when the spec
// gives none: the targets of planned experiments lie between 1e-3 and
// 1e-2, and a log axis cannot reach r = 0.
const DefaultRCut = 1e-4

// Corner places the legend inside the data area.
type Corner int

// Legend corners; NoLegend omits it.
const (
	TopRight Corner = iota
	TopLeft
	BottomRight
	BottomLeft
	NoLegend
)

// ConstraintLayer is one constraint set drawn as its 68.27% (darker) and
// 95.45% (lighter) regions with their boundaries.
type ConstraintLayer struct {
	Set   compare.Constraint // compare.Gaussian, *compare.Gaussian or *compare.KDE
	Label string             // legend text; empty means Set.Label()
	Color color.Color        // nil picks from the palette
}

// Curve is a model's predictions: points in order, optionally joined.
// Join them along N* (same model, parameters and history, different fixed
// N*) or along a scanned parameter (same model and history, different
// parameter value): CurvesAlong builds either from results.
type Curve struct {
	Label  string          // legend text; empty means no legend entry
	Points []compare.Point // in drawing order
	Tags   []string        // optional text beside each point ("" for none); nil or len(Points)
	Join   bool            // draw a line through the points in order
	Marker Marker          // glyph at each point
	Color  color.Color     // nil picks from the palette
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
	Label        string          // legend text; empty means no legend entry
	Lower, Upper []compare.Point // the two edges of a scanned model's stripe
	Path         []compare.Point // a single model's band along its curve
	Color        color.Color     // nil picks from the curve palette (stripe i matches curve i)
}

// NsRSpec describes the n_s-r figure. Layers are drawn in the order
// constraints, stripes, curves.
type NsRSpec struct {
	Title       string            // figure title, plain text
	RScale      Scale             // Linear (from r = 0) or Log (from RCut)
	RCut        float64           // lower end of a Log r axis; 0 means DefaultRCut
	NsRange     [2]float64        // n_s axis range; zero means fit to the content
	RRange      [2]float64        // r axis range; zero means fit to the content
	Constraints []ConstraintLayer // drawn first, in order
	Stripes     []Stripe          // reheating bands, over the constraints
	Curves      []Curve           // model predictions, on top
	Grid        int               // nodes a side of a KDE set's density grid; 0 means DefaultGrid
	Legend      Corner            // where the legend goes (TopRight by default)
}

// DefaultGrid is the number of grid nodes a side on which a KDE
// constraint's density is evaluated for its contours.
const DefaultGrid = 100

// XYCurve is a curve of r against a scanned parameter, optionally joined.
type XYCurve struct {
	Label  string      // legend text; empty means no legend entry
	X, R   []float64   // the scanned value (as plotted, e.g. 3 alpha) and r, pairwise
	Join   bool        // draw a line through the points in order
	Marker Marker      // glyph at each point
	Color  color.Color // nil picks from the palette
}

// ForecastLine is a horizontal line at r = K sigma(r) of a planned
// experiment: above it that experiment would detect r at K standard
// deviations or more (compare.Forecast.Significance).
type ForecastLine struct {
	Forecast compare.Forecast // the experiment and its sigma(r)
	K        float64          // multiple of sigma(r); 0 means 1
	Label    string           // text on the line; empty means "<name>: <K> sigma(r) = <value>"
	Color    color.Color      // nil means grey
}

// RAlphaSpec describes the figure of r against a scanned parameter such as
// 3 alpha, on a logarithmic r axis.
type RAlphaSpec struct {
	Title     string         // figure title, plain text
	XLabel    string         // empty means "3 alpha"
	XScale    Scale          // Linear or Log
	XRange    [2]float64     // zero means fit to the content
	RRange    [2]float64     // zero means fit to the content (and the forecast lines)
	RCut      float64        // smallest r shown when fitting; 0 means DefaultRCut
	Curves    []XYCurve      // predictions
	Forecasts []ForecastLine // horizontal sensitivity lines
	Legend    Corner         // where the legend goes (TopRight by default)
}
