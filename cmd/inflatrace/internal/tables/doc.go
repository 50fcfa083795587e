// Package tables writes study results as paper and data tables: CSV
// (RFC 4180), JSON, Markdown pipe tables and LaTeX booktabs tables
// (Write), and any grid of cells in the same formats (WriteGrid).
//
// Layouts. The wide layout (the default) writes one row per prediction:
// the results that differ only in the constraint set or forecast they
// were compared with (the same model, parameters, method and reheating
// history: the same label but for its last part) share a row, and each
// set gets a group of the comparison columns, in the order the sets first
// appear in the rows given; a forecast's group carries its detection
// significance. A comparison column is left out of a set's group when no
// row has a value in it there (a constraint set has no detection
// significance, a forecast no Delta chi^2). A result with no set (a
// reheating band) is a row of its own. The long layout writes one row per
// result, as the ledger records them.
//
// Columns, by name (CSV header and JSON key; Markdown and LaTeX headers
// in brackets where they differ):
//
//	row                the row's number from 1 [#, \#]: for a run's recorded
//	                   results in order, the N of "trace RUN#N"; in the wide
//	                   layout that of the prediction's first result (its
//	                   other sets' results follow it in a run's order)
//	label              the result label "model(params) | history | constraint";
//	                   in the wide layout without the constraint part
//	model_label        the [[model]] label, or the family when none is given
//	                   [Model label, Model]
//	model              model family
//	params             all model parameters, "alpha=1/3, n=1" (JSON: an object)
//	param.NAME         one model parameter [NAME; Greek names as $\alpha$ in LaTeX]
//	method             slow-roll method
//	reheating          reheating kind (fixed-efolds, instantaneous, ...)
//	history            the history part of the label ("N*=55", "w=0 T_reh=1e9 GeV")
//	N_star             [N*, $N_*$]
//	phi_star, phi_end  field values in reduced Planck units [phi* [M_Pl], $\phi_*$ [$M_{\rm Pl}$]]
//	n_s, r, alpha_s, n_t
//	energy_scale_GeV   V_*^{1/4} [V*^(1/4) [GeV], $V_*^{1/4}$ [GeV]]
//	H_star_GeV         [H* [GeV], $H_*$ [GeV]]
//	T_reh_GeV, T_max_GeV, w_reh, N_reh, below_bbn
//	N_star_min, N_star_max, n_s_min, n_s_max, r_min, r_max   a band's span
//	constraint         constraint set or forecast name (long layout; the
//	                   group header in the wide one)
//	delta_chi2, n_sigma, inside_68, inside_95   the comparison with a set
//	detection_sigma    a forecast's detection significance of r [detection [sigma]]
//	detected_5sigma    whether it reaches 5 sigma
//	key, error
//
// Columns from constraint to key are of the comparison: in the wide layout
// they are repeated in each set's group, and CSV and JSON name them
// "NAME[SET]" ("delta_chi2[cmb-combined-2025]", flat keys, so that the
// two formats and --where share one name). Markdown heads them "SET:
// header"; LaTeX puts the set's name over its group. Default columns
// (DefaultColumns) start with row and model_label and end with the
// comparison (delta_chi2, n_sigma, inside_95, detection_sigma); LaTeX
// leaves the row number and the family out (DefaultLaTeXColumns).
//
// Rows. Options.Where keeps the rows meeting every condition "COLUMN OP
// VALUE", OP one of = != < <= > >=. Any column may be named, written or
// not; in the wide layout a comparison column is "NAME[SET]", or NAME
// alone when exactly one set has values in it. Numeric columns compare as
// numbers (VALUE may be a ratio such as 1/3, = is exact), yes/no columns
// take yes, no, true or false with = and !=, text columns compare with =
// and != ignoring case (so model=T-model finds the family t-model, and
// the label T-model in model_label). A row with no value in the column
// never matches. Options.Sort orders the rows by columns, "-COLUMN"
// descending, stably, missing values last; text sorts ignoring case.
//
// Numbers. Computed numbers are written, in Markdown and LaTeX, to
// Options.Digits significant digits (default 4) with trailing zeros kept,
// and with one notation per column: positional when every value of the
// column has a decimal exponent from -3 to digits-1, else scientific for
// the whole column (2.481e+13 in Markdown). In CSV and JSON every number
// is by default the shortest decimal that reads back to the same float64
// (exact), unless Digits is given; Options.Exact makes every format
// exact. Model parameters are inputs and are always exact: in Markdown
// and LaTeX as the study wrote them ("1/3", read from the result label
// and kept only when it reads back to the recorded value, see
// WrittenParams), in CSV's param.NAME and JSON as numbers. A failed
// result's computed cells are missing (its error is in the error column).
//
// LaTeX. A table is a tabular environment to \input, with booktabs rules
// (\toprule, \midrule, \bottomrule, and a \cmidrule under each set's
// name); computed numbers are in siunitx S columns whose table-format is
// chosen from the column's numbers, so that they align on the decimal
// marker, with text cells and headers in braces. With a caption or label
// the tabular is set in a table float, caption above (the convention of
// the field's journals); Options.LongTable writes a longtable instead, its
// caption and head repeated on every page. The document's preamble needs
// \usepackage{booktabs,siunitx} (and longtable for a long table:
// LaTeXPackages).
package tables
