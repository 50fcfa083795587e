package study

import (
	"errors"
	"strings"
	"testing"
)

// A study naming a renamed family is refused at the family key's line with
// an error that names the new family (stages/model's renamed table).
func TestRenamedFamilyRefused(t *testing.T) {
	text := "[[reheating]]\nhistory = \"fixed-efolds\"\nN_star = 55\n[[constraint]]\nuse = \"cmb-combined-2025\"\n[[model]]\nfamily = \"radion-gauge\"\nalpha = 1\n"
	_, err := Parse("old.toml", []byte(text), ".")
	var ce *ConfigError
	if !errors.As(err, &ce) {
		t.Fatalf("error %v is not a ConfigError", err)
	}
	if ce.File != "old.toml" || ce.Line != 7 {
		t.Errorf("error at %s:%d, want old.toml:7 (%v)", ce.File, ce.Line, err)
	}
	if want := `family "radion-gauge" was renamed "radion-assisted-gauge"`; !strings.Contains(err.Error(), want) {
		t.Errorf("error %q does not say %q", err, want)
	}
	// The new name decodes.
	ok := strings.Replace(text, "radion-gauge", "radion-assisted-gauge", 1)
	if _, err := Parse("new.toml", []byte(ok), "."); err != nil {
		t.Errorf("radion-assisted-gauge: %v", err)
	}
}
