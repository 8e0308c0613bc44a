package scenario_test

import (
	"fmt"

	"hdrisk/engine/scenario"
)

// A share link carries the whole scenario as a code after "#"; DecodeLink reads the link
// or the bare code and checks the scenario as Decode does.
func ExampleEncodeLink() {
	s, err := scenario.Decode([]byte(`{"kind": "hdrisk.scenario", "version": 1,
		"title": "Invented example: a share link",
		"design": {"shape": "gaussian", "alpha": 0.5},
		"signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
		"noise": {"variance": 0.01},
		"penalty": {"kind": "l1", "l1": 0.1}}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	code, err := scenario.EncodeLink(s)
	if err != nil {
		fmt.Println(err)
		return
	}
	back, err := scenario.DecodeLink("https://example.org/hdrisk.html#" + code)
	if err != nil {
		fmt.Println(err)
		return
	}
	l1, _ := back.Get("l1")
	fmt.Println(code[:3], back.Title, back.Design.Shape, l1)
	_, err = scenario.DecodeLink(code[:len(code)-4])
	fmt.Println(err != nil)
	// Output:
	// s1. Invented example: a share link gaussian 0.1
	// true
}
