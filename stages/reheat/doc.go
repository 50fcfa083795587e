// Package reheat matches a slow-roll solution to the expansion history after
// inflation: it fixes the number of e-folds N* between the exit of the
// pivot scale k* and the end of inflation, normalises the potential to the
// measured scalar amplitude A_s, and converts the energy scale and H* to GeV.
//
// Physics runs in reduced Planck units (M_p = 1); GeV and Mpc^-1 appear
// only in the constants below and in the GeV helpers.
package reheat
