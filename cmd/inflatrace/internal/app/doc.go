// Package app wires inflatrace's commands: the root command, global flags,
// the environment a command sees (streams, clock, randomness, environment
// variables, all injected so commands can be tested), ledger opening and
// exit codes. Each command lives in a package of its own with an options
// struct, a constructor that parses flags into it, and a run function.
package app
