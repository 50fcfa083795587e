// Package figures draws the paper figures of a run with gonum.org/v1/plot:
// the n_s-r plane (NsR) and r against a scanned parameter (RAlpha), and
// writes them as PDF, SVG or PNG (Save).
//
// Design.
//
//   - Specs, not results. A figure is described by a plain spec (NsRSpec,
//     RAlphaSpec) holding points, stripes, constraint sets and forecasts;
//     CurvesAlong, RCurvesAlong and StripeFromResults fill the parts of a
//     spec from study results, so the drawing code knows nothing of runs.
//   - A figure is a plot and its key (Figure). The key is drawn below the
//     data area, outside it, in as many columns as fit, and the figure
//     grows with it: no entry covers the data, and any number of models
//     can be named. Models differ by line style (colour, then dash),
//     reheating histories by marker shape; nothing is written on the data.
//     Figure.Overlaps draws the figure and reports any two labels whose
//     boxes meet, a key entry over the data, or a label off the page.
//   - Constraint regions. A Gaussian set's 68.27% and 95.45% boundaries are
//     its Delta chi^2 = 2.30 and 6.18 ellipses, computed analytically and
//     cut at r = 0 (compare.Gaussian.Contour). A KDE set's boundaries are
//     isolines of its density at the highest-density levels, traced by
//     marching squares on a grid (isolines) with the inside kept on the
//     left, so that regions with holes fill correctly. The 68% region is
//     filled and outlined, the 95% region only outlined, dashed.
//   - Axes follow the content unless fixed; points outside fixed ranges
//     are counted (Figure.Clipped), never dropped silently. Everything is
//     clipped to the axis box in data coordinates before it is mapped to
//     the canvas, since a log axis cannot map r <= 0.
//   - Text is typeset by Typeset, a small text handler of our own for
//     subscripts, superscripts and Greek letters in the compiled-in
//     Liberation Serif (gonum's LaTeX handler, in the version used, renders
//     no sub- or superscript). Symbols are upright: gonum's PDF canvas can
//     embed only one TrueType font per file. User text goes through
//     plainText and is written as given.
//   - Output. 6 inches wide, 4.5 inches tall above the key; PNG at 150
//     dpi. Rendering is pure Go with compiled-in fonts, which PDF and SVG
//     embed, and writes no time stamps, so the bytes depend only on the
//     spec and the library versions.
package figures
