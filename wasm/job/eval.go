package job

import (
	"errors"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
	"hdrisk/protocol"
)

func init() {
	Serve(protocol.Eval, func(a protocol.EvalArgs, _ func(int, int)) (fixedpoint.Result, error) { return Eval(a) })
}

// Eval solves the fixed point of one scenario (docs/method.md section 3). Special cases are: a
// missing or invalid scenario is an error naming the field (scenario.FieldError).
func Eval(args protocol.EvalArgs) (fixedpoint.Result, error) {
	if len(args.Scenario) == 0 {
		return fixedpoint.Result{}, errors.New("scenario: missing")
	}
	s, err := scenario.Decode(args.Scenario)
	if err != nil {
		return fixedpoint.Result{}, err
	}
	c, err := s.Check()
	if err != nil {
		return fixedpoint.Result{}, err
	}
	return EvalChecked(c)
}

// EvalChecked solves the fixed point of a scenario checked already (the page's own
// evaluation, which checked it once for the edit).
func EvalChecked(c scenario.Checked) (fixedpoint.Result, error) {
	if g, ok := c.GLM(); ok {
		return fixedpoint.SolveGLM(g, fixedpoint.Options{})
	}
	return fixedpoint.Solve(c.Problem(), fixedpoint.Options{})
}
