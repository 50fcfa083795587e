// Package compare confronts predicted (n_s, r) with a published constraint,
// approximated as a two-dimensional Gaussian with r truncated at zero, and
// expresses the distance as Delta chi^2 from the best allowed point and as
// the equivalent number of Gaussian standard deviations for two parameters.
package compare
