package canonical_test

import (
	"fmt"

	"github.com/inflatrace/inflatrace/stages/canonical"
	"github.com/inflatrace/inflatrace/stages/model"
)

// Check the Poincaré-disk map of the T-model with 3 alpha = 7.
func ExampleVerify() {
	f, _ := model.Lookup("t-model")
	m, _ := f.New(map[string]float64{"alpha": 7.0 / 3})
	rep, err := canonical.Verify(m, nil)
	fmt.Println(rep.Field, rep.MapFormula, err, rep.MapDev < 1e-9)
	// Output: chi chi = sqrt(6 alpha) tanh(phi/sqrt(6 alpha)) <nil> true
}
