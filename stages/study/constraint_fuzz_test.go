package study

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/pelletier/go-toml/v2"

	"github.com/inflatrace/inflatrace/stages/compare"
)

// FuzzConstraintFile checks the readers of constraint set files on
// arbitrary bytes: ParseConstraint (a Gaussian set), ParseForecast (a
// forecast) and LoadSampleSet (a set given as samples, the bytes written
// to a file beside a valid samples file). None panics. An error from
// ParseConstraint or ParseForecast is a *ConfigError naming the file, with
// a message and a line inside the text or a key path; LoadSampleSet's
// error names the constraint file or the samples file. What
// ParseConstraint accepts passes Gaussian.Check, has a name, a citation
// and a plausible n_s, and written back as a file (r as mean and sigma)
// parses to the same set; what ParseForecast accepts passes
// Forecast.Check and round-trips the same way; a sample set has a name, a
// citation and MinSamples to MaxKDESamples finite points.
func FuzzConstraintFile(f *testing.F) {
	dir := writeFuzzFiles(f)
	for _, s := range []string{
		fuzzFiles["gauss.toml"], fuzzFiles["samples.toml"], fuzzFiles["forecast.toml"],
		"name = \"x\"\ncitation = \"c\"\n[n_s]\nmean = 0.96\nsigma = 0.004\n[r]\nupper_95 = 0.03\n",
		"name = \"x\"\n[n_s]\nmean = 0.96\nsigma = 0.004\n[r]\nupper_95 = 0.03\n",
		"name = \"x\"\ncitation = \"c\"\n[n_s]\nmean = 0.96\nsigma = 0.004\n[r]\nupper_95 = 0.03\nmean = 0\nsigma = 1\n",
		"name = \"x\"\ncitation = \"c\"\n[n_s]\nmean = nan\nsigma = inf\n[r]\nupper_95 = -0.0\n",
		"name = \"x\"\ncitation = \"c\"\n[n_s]\nmean = 1.5\nsigma = 1e-320\n[r]\nmean = 1e308\nsigma = 1e308\n[approximation]\ncorrelation = 1\n",
		"name = \"x\"\ncitation = \"c\"\n[n_s]\nmean = \"1/0\"\nsigma = 0.004\n",
		"name = \"x\"\ncitation = \"c\"\n[samples]\nfile = \"samples.txt\"\n[n_s]\nmean = 0.96\n",
		"name = \"x\"\ncitation = \"c\"\n[samples]\nfile = \"missing.txt\"\n",
		"name = \"x\"\ncitation = \"c\"\n[samples]\nfile = \"gauss.toml\"\n",
		"name = \"x\"\ncitation = \"c\"\nsigma_r = 0\nfiducial_r = 0.01\n",
		"name = \"\u00e9\u2603\"\ncitation = \"" + strings.Repeat("long ", 2000) + "\"\nsigma_r = 1e-3\n",
		"name = 'x'\ncitation = '''c\nd'''\n[n_s]\nmean = 9_6e-2\nsigma = 0x1\n[r]\nupper_95 = +inf\n",
		"[n_s.mean.x]\n", "n_s = {mean = {a = [[[[1]]]]}}\n", "\xef\xbb\xbfname = \"x\"\n", "",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		const file = "fuzz/set.toml"
		g, err := ParseConstraint(file, data)
		if err != nil {
			checkFileError(t, file, data, err)
		} else {
			checkGaussian(t, g)
		}
		fc, err := ParseForecast(file, data)
		if err != nil {
			checkFileError(t, file, data, err)
		} else {
			checkForecast(t, fc)
		}
		if !localFileNames(data) {
			return
		}
		path := filepath.Join(dir, "fuzzed.toml")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		ss, isSamples, err := LoadSampleSet(path)
		switch {
		case err != nil:
			if msg := err.Error(); !strings.HasPrefix(msg, path) && !strings.HasPrefix(msg, dir) {
				t.Fatalf("sample set error %q names neither the file nor the samples", msg)
			}
		case isSamples:
			if ss.Name == "" || ss.Citation == "" || len(ss.Points) < compare.MinSamples || len(ss.Points) > compare.MaxKDESamples {
				t.Fatalf("sample set %q (%q) with %d points", ss.Name, ss.Citation, len(ss.Points))
			}
			for i, p := range ss.Points {
				if math.IsNaN(p.Ns) || math.IsInf(p.Ns, 0) || math.IsNaN(p.R) || math.IsInf(p.R, 0) || p.R < 0 {
					t.Fatalf("sample %d = %+v", i, p)
				}
			}
		}
	})
}

// checkFileError checks an error from reading a constraint or forecast
// file: a *ConfigError naming file with a message, at a line inside data
// or at a key path.
func checkFileError(t *testing.T, file string, data []byte, err error) {
	t.Helper()
	var ce *ConfigError
	if !errors.As(err, &ce) {
		t.Fatalf("error %T %v, want a *ConfigError", err, err)
	}
	lines := strings.Count(string(data), "\n") + 1
	switch {
	case ce.File != file || ce.Msg == "":
		t.Fatalf("error %+v: want file %q and a message", ce, file)
	case ce.Line < 0 || ce.Line > lines || ce.Column < 0:
		t.Fatalf("error at line %d, column %d of a %d-line text: %v", ce.Line, ce.Column, lines, err)
	case ce.Line == 0 && ce.Path == "" && !strings.HasPrefix(ce.Msg, "constraint "):
		// Gaussian.Check's complaints name the set ("constraint x: ...").
		t.Fatalf("error names neither a line nor a key: %v", err)
	}
}

// checkGaussian checks an accepted Gaussian set and its round trip.
func checkGaussian(t *testing.T, g compare.Gaussian) {
	t.Helper()
	if err := g.Check(); err != nil {
		t.Fatalf("accepted a set that fails its check: %v", err)
	}
	if g.Name == "" || g.Citation == "" || !(math.Abs(g.MeanNs-1) <= 0.5) {
		t.Fatalf("accepted %+v", g)
	}
	text, err := toml.Marshal(map[string]any{
		"name": g.Name, "citation": g.Citation,
		"n_s":           map[string]any{"mean": g.MeanNs, "sigma": g.SigmaNs},
		"r":             map[string]any{"mean": g.MeanR, "sigma": g.SigmaR},
		"approximation": map[string]any{"correlation": g.Rho},
	})
	if err != nil {
		t.Fatalf("cannot write %+v back: %v", g, err)
	}
	back, err := ParseConstraint("again.toml", text)
	if err != nil {
		t.Fatalf("%+v written back does not parse: %v\n%s", g, err, text)
	}
	if !reflect.DeepEqual(back, g) {
		t.Fatalf("%+v written back parses to %+v", g, back)
	}
}

// checkForecast checks an accepted forecast and its round trip.
func checkForecast(t *testing.T, f compare.Forecast) {
	t.Helper()
	if err := f.Check(); err != nil || f.Name == "" || f.Citation == "" {
		t.Fatalf("accepted %+v (%v)", f, err)
	}
	text, err := toml.Marshal(map[string]any{"name": f.Name, "citation": f.Citation, "sigma_r": f.SigmaR, "fiducial_r": 0.0})
	if err != nil {
		t.Fatalf("cannot write %+v back: %v", f, err)
	}
	back, err := ParseForecast("again.toml", text)
	if err != nil {
		t.Fatalf("%+v written back does not parse: %v\n%s", f, err, text)
	}
	if !reflect.DeepEqual(back, f) {
		t.Fatalf("%+v written back parses to %+v", f, back)
	}
}
