package study

import (
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strings"

	"github.com/inflatrace/inflatrace/configs"
	"github.com/inflatrace/inflatrace/stages/compare"
)

type forecastFile struct {
	Name      string   `toml:"name"`
	Title     string   `toml:"title"`
	Citation  string   `toml:"citation"`
	SigmaR    *float64 `toml:"sigma_r"`
	FiducialR *float64 `toml:"fiducial_r"`
}

// ParseForecast reads a forecast file: a planned experiment's sigma(r) at
// fiducial r = 0, with its citation.
func ParseForecast(file string, data []byte) (compare.Forecast, error) {
	c := &parser{file: file}
	var ff forecastFile
	if err := c.decodeStrict(data, &ff); err != nil {
		return compare.Forecast{}, err
	}
	switch {
	case ff.Name == "":
		return compare.Forecast{}, c.errAt("name", "missing name")
	case ff.Citation == "":
		return compare.Forecast{}, c.errAt("citation", "missing citation")
	case ff.SigmaR == nil:
		return compare.Forecast{}, c.errAt("sigma_r", "missing sigma_r")
	case ff.FiducialR != nil && *ff.FiducialR != 0:
		return compare.Forecast{}, c.errAt("fiducial_r", "only forecasts at fiducial r = 0 are supported")
	}
	f := compare.Forecast{Name: ff.Name, Citation: ff.Citation, SigmaR: *ff.SigmaR}
	if err := f.Check(); err != nil {
		return f, c.errAt("sigma_r", "%v", err)
	}
	return f, nil
}

// ShippedForecast returns a shipped forecast by name.
func ShippedForecast(name string) (compare.Forecast, error) {
	file := path.Join("constraints", "forecasts", name+".toml")
	data, err := fs.ReadFile(configs.Constraints, file)
	if err != nil {
		return compare.Forecast{}, fmt.Errorf("no shipped forecast %q (shipped: %s)", name, strings.Join(ForecastNames(), ", "))
	}
	return ParseForecast("configs/"+file, data)
}

// ForecastNames lists the shipped forecasts.
func ForecastNames() []string {
	entries, _ := fs.ReadDir(configs.Constraints, "constraints/forecasts")
	var names []string
	for _, e := range entries {
		if n, ok := strings.CutSuffix(e.Name(), ".toml"); ok {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return names
}
