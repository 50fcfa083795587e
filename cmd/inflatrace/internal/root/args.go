package root

import "strings"

// isArgError recognises cobra's own argument and command errors, which it
// returns as plain errors.
func isArgError(err error) bool {
	msg := err.Error()
	for _, p := range []string{"unknown command", "accepts ", "requires at least", "required flag", "unknown flag", "unknown shorthand flag", "invalid argument"} {
		if strings.Contains(msg, p) {
			return true
		}
	}
	return false
}
