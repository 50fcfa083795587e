// Command inflatrace turns single-field inflation models into the numbers
// CMB data test, as a reproducible pipeline with a provenance ledger.
package main

import (
	"os"

	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/app"
	"github.com/inflatrace/inflatrace/cmd/inflatrace/internal/root"
)

func main() {
	os.Exit(root.Main(app.System(), os.Args[1:]))
}
