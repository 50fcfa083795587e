// Package revision compares two recorded runs of a study, as a paper's
// revision needs: it lists every assumption that differs between them
// (configuration fields, stage versions, the tool version, constraint
// data), pairs their results by identity (model, parameters, reheating
// history, method, end condition, constraint; never by position), lists
// the results only one run has, and attributes each paired result's
// change to the differing configuration fields by evaluating the
// intermediate configurations through the cached DAG.
//
// It knows runs only as configuration text, nodes and results (Run) and
// storage only through Finder, so a test or another front end reaches it
// without a ledger or a command line.
//
// Attribution uses the Shapley decomposition (Shapley 1953, "A value for
// n-person games", Contributions to the Theory of Games II, 307): the
// contribution of assumption i is the average, over every order in which
// the assumptions can be switched from run A's value to run B's, of the
// change that switching i causes. It is symmetric (the order of the
// assumptions does not matter) and its contributions add up to the change
// between the two configurations exactly; what remains of the recorded
// change — effects of stage or tool versions, which cannot be re-evaluated,
// and rounding — is reported as the remainder.
package revision
