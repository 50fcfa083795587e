// Package reportcmd implements "inflatrace table RUN" and "inflatrace plot
// RUN": paper tables and figures of a recorded run, drawn from the ledger
// without recomputing anything. It also writes the tables and figures of
// release archives.
package reportcmd
