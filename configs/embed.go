// Package configs embeds the constraint sets shipped with inflatrace
// (configs/constraints/*.toml) and the forecast sensitivities of planned
// experiments (configs/constraints/forecasts/*.toml), so that a study can
// name them without a path. The demo study and other example
// configurations live beside this file as plain TOML and are read from
// disk.
package configs

import "embed"

// Constraints holds constraints/*.toml and constraints/forecasts/*.toml.
//
//go:embed constraints/*.toml constraints/forecasts/*.toml
var Constraints embed.FS
