// Package modelscmd implements "inflatrace models": the built-in model
// families with their formulas, parameters and references.
package modelscmd

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/stages/model"
)

// Options are the parsed flags of models.
type Options struct {
	Env  *app.Env
	JSON bool
}

// NewCmd returns the models command.
func NewCmd(env *app.Env, run func(context.Context, *Options) error) *cobra.Command {
	opts := &Options{Env: env}
	if run == nil {
		run = Run
	}
	cmd := &cobra.Command{
		Use:   "models",
		Short: "List the built-in model families: formula, parameters (range, unit, default), reference",
		Args:  cobra.NoArgs,
		RunE:  func(c *cobra.Command, _ []string) error { return run(c.Context(), opts) },
	}
	cmd.Flags().BoolVar(&opts.JSON, "json", false, "print the catalogue as JSON")
	return cmd
}

// Param is the JSON shape of a family parameter.
type Param struct {
	Name     string   `json:"name"`
	Unit     string   `json:"unit"`
	Min      *float64 `json:"min,omitempty"`
	Max      *float64 `json:"max,omitempty"`
	MinOpen  bool     `json:"min_open"`
	MaxOpen  bool     `json:"max_open"`
	Default  *float64 `json:"default,omitempty"`
	Doc      string   `json:"doc,omitempty"`
	Interval string   `json:"interval"`
}

// Family is the JSON shape of a family.
type Family struct {
	Name      string   `json:"name"`
	Kind      string   `json:"kind"`
	Tags      []string `json:"tags,omitempty"`
	Formula   string   `json:"formula"`
	Reference string   `json:"reference"`
	Params    []Param  `json:"params"`
}

func finite(x float64) *float64 {
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return nil
	}
	return &x
}

// Catalogue returns every built-in family.
func Catalogue() []Family {
	var out []Family
	for _, n := range model.Names() {
		f, _ := model.Lookup(n)
		fam := Family{Name: f.Name, Kind: f.Kind, Tags: f.Tags, Formula: f.Formula, Reference: f.Reference, Params: []Param{}}
		for _, p := range f.Params {
			fam.Params = append(fam.Params, Param{Name: p.Name, Unit: p.Unit, Min: finite(p.Min), Max: finite(p.Max),
				MinOpen: p.MinOpen, MaxOpen: p.MaxOpen, Default: finite(p.Default), Doc: p.Doc, Interval: p.Interval()})
		}
		out = append(out, fam)
	}
	return out
}

// Run prints the catalogue.
func Run(_ context.Context, o *Options) error {
	cat := Catalogue()
	if o.JSON {
		return app.JSON(o.Env.Stdout, cat)
	}
	rows := make([][]string, len(cat))
	for i, f := range cat {
		var ps []string
		for _, p := range f.Params {
			s := fmt.Sprintf("%s [%s] in %s", p.Name, p.Unit, p.Interval)
			if p.Default != nil {
				s += fmt.Sprintf(", default %g", *p.Default)
			}
			ps = append(ps, s)
		}
		if len(ps) == 0 {
			ps = []string{"-"}
		}
		rows[i] = []string{f.Name, f.Kind, strings.Join(ps, "; "), f.Formula, f.Reference}
	}
	return o.Env.Table(o.Env.Stdout, []string{"family", "kind", "parameters", "potential", "reference"}, rows)
}
