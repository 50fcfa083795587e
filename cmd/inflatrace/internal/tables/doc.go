// Package tables writes study results as paper and data tables: CSV
// (RFC 4180), JSON, Markdown pipe tables and LaTeX tabular environments
// (Write).
//
// Columns, by name (CSV header and JSON key; Markdown and LaTeX headers
// in brackets where they differ):
//
//	row                the row's number from 1 [#, \#]: for a run's recorded
//	                   results in order, the N of "trace RUN#N"
//	label              the result label "model(params) | history | constraint"
//	model_label        the [[model]] label, or the family when none is given
//	                   [Model label, Model]
//	model              model family
//	params             all model parameters, "alpha=1, n=2" (JSON: an object)
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
//	constraint         constraint set name
//	delta_chi2, n_sigma, inside_68, inside_95
//	key, error
//
// Default columns (DefaultColumns) start with row and model_label; LaTeX
// leaves the row number out (DefaultLaTeXColumns), as a paper's table does
// not carry it: name the column row to have it.
//
// Numbers. Computed numbers are written to Options.Digits significant
// digits (default 4): in Markdown and LaTeX with trailing zeros kept,
// positional for decimal exponents -3 to digits-1 and scientific outside
// ($2.481\times10^{13}$ in LaTeX, 2.481e+13 in Markdown); in CSV and JSON
// as the shortest decimal of the rounded value. Options.Exact writes every
// number as the shortest decimal that reads back to the same float64.
// Model parameters are inputs and are always written exactly. A failed
// result's computed cells are missing (its error is in the error column).
package tables
