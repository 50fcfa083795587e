// Package configs embeds the constraint sets shipped with inflatrace
// (configs/constraints/*.toml), so that a study can name them without a
// path. The demo study and other example configurations live beside this
// file as plain TOML and are read from disk.
package configs

import "embed"

// Constraints holds constraints/*.toml.
//
//go:embed constraints/*.toml
var Constraints embed.FS
