// Package figures draws the paper figures of a run with gonum.org/v1/plot:
// the n_s-r plane (NsR) and r against a scanned parameter (RAlpha), and
// writes them as PNG or SVG (Save).
//
// Design.
//
//   - Specs, not results. A figure is described by a plain spec (NsRSpec,
//     RAlphaSpec) holding points, stripes and constraint sets; CurvesAlong,
//     RCurvesAlong and StripeFromResults fill the parts of a spec from
//     study results, so the drawing code knows nothing about runs.
//   - Constraint regions. A Gaussian set's 68.27% and 95.45% boundaries are
//     its Delta chi^2 = 2.30 and 6.18 ellipses, computed analytically and
//     cut at r = 0 (compare.Gaussian.Contour). A KDE set's boundaries are
//     isolines of its density at the highest-density levels, traced by
//     marching squares on a grid (isolines) with the inside kept on the
//     left, so that regions with holes fill correctly.
//   - Log axes. A logarithmic r axis starts at a cut (DefaultRCut = 1e-4);
//     everything is clipped to the axis box in data coordinates before it
//     is mapped to the canvas, since a log axis cannot map r <= 0.
//   - Text is plain (gonum's plain handler with its compiled-in Liberation
//     fonts): "n_s", not LaTeX, whose subscripts the library cannot render;
//     Greek letters render, Unicode subscript characters do not.
//   - Output. 6 x 4.5 inches; PNG at 150 dpi (900 x 675 pixels). Rendering
//     is pure Go with compiled-in fonts and writes no time stamps, so the
//     bytes depend only on the spec and the library versions.
package figures
