package expr

import (
	"fmt"
	"math"

	"github.com/Knetic/govaluate"
)

// Division, remainder and power are the operations that turn finite
// numbers into an infinity or NaN (1/0, 0/0, 10^400, (-8)^(1/3)). They are
// evaluated by checked functions that report the problem at the
// operator's own column, instead of letting a NaN travel into a result (an
// expectation `x / 0 > 1` held; README.md, "Limits").

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// checked reports whether op is evaluated by checkedOp.
func checked(op string) bool { return op == "/" || op == "%" || op == "**" }

// checkedOp returns the function that computes a op b for the operator
// written as text at byte offset col.
func checkedOp(op, text string, col int) govaluate.ExpressionFunction {
	return func(args ...any) (any, error) {
		a, okA := args[0].(float64)
		b, okB := args[1].(float64)
		if !okA || !okB {
			bad := args[0]
			if okA {
				bad = args[1]
			}
			return nil, &Error{Col: col, Msg: fmt.Sprintf("%q needs numbers, got '%v'", text, bad)}
		}
		v, _ := fold(op, a, b)
		if finite(v) {
			return v, nil
		}
		return nil, &Error{Col: col, Msg: opProblem(op, a, b, v)}
	}
}

// opProblem says why a op b is not a finite number.
func opProblem(op string, a, b, v float64) string {
	switch {
	case op == "/" && b == 0:
		return "division by zero: the value after / is 0"
	case op == "%" && b == 0:
		return "the remainder of a division by zero: the value after % is 0"
	case op == "**" && a == 0 && b < 0:
		return "0 to a negative power is a division by zero"
	case op == "**" && math.IsNaN(v) && a < 0:
		return fmt.Sprintf("a negative number to a fractional power ((%s)^%s) is not a real number", trim(a), trim(b))
	}
	return "the result is past the largest number worth can hold (about 1.8 × 10^308)"
}

func trim(x float64) string { return fmt.Sprintf("%.4g", x) }
