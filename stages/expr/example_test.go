package expr_test

import (
	"errors"
	"fmt"

	"github.com/inflatrace/inflatrace/stages/expr"
)

func ExampleCompile() {
	e, err := expr.Compile("tanh(x/sqrt(6*alpha))^2", "x", map[string]float64{"alpha": 1.0 / 6})
	if err != nil {
		fmt.Println(err)
		return
	}
	j := e.At(0) // tanh(x)^2 at 0: 0, 0, 2, 0
	fmt.Println(e, e.Params())
	fmt.Println(j.V, j.D1, j.D2, j.D3)
	// Output:
	// tanh(x / sqrt(6 * alpha))^2 [alpha]
	// 0 0 2 0
}

func ExampleSyntaxError_Caret() {
	_, err := expr.Compile("V0*(1 - exp(-x)^2", "x", map[string]float64{"V0": 1})
	var se *expr.SyntaxError
	if errors.As(err, &se) {
		fmt.Println(se.Msg)
		fmt.Println(se.Caret())
	}
	// Output:
	// this '(' is never closed
	// V0*(1 - exp(-x)^2
	//    ^
}

func ExampleCompileWith() {
	// A constant kinetic function needs AllowConstant.
	k, err := expr.CompileWith("1", "x", nil, &expr.Options{AllowConstant: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(k.At(3), k.DependsOnField())
	_, err = expr.Compile("1", "x", nil)
	fmt.Println(err)
	// Output:
	// {1 0 0 0} false
	// expression "1": column 1: the expression does not depend on the field x (it is the constant 1)
}
