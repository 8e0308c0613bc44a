package data_test

import (
	"context"
	"fmt"
	"strings"

	"hdrisk/engine/data"
)

// An invented 2 x 3 matrix in Matrix Market coordinate form; its rows are orthogonal with
// norms 2 and 1, so its singular values are 2 and 1.
func ExampleReadMatrix() {
	const file = `%%MatrixMarket matrix coordinate real general
% invented example
2 3 2
1 2 2.0
2 3 -1
`
	a, err := data.ReadMatrix(strings.NewReader(file), data.Limits{})
	if err != nil {
		fmt.Println(err)
		return
	}
	sv, _ := data.SingularValues(context.Background(), a, nil)
	s, _ := data.Summarize(sv, 2, 3, 2)
	fmt.Println(sv, s.Alpha, s.Condition, s.Rank)
	// Output: [2 1] 0.6666666666666666 2 2
}

func ExampleReadMatrix_error() {
	_, err := data.ReadMatrix(strings.NewReader("1,2,3\n4,5\n"), data.Limits{})
	fmt.Println(err)
	// Output: line 2: expected 3 numbers, found 2
}

// Eigenvalues of F^T F, pasted with a header, become singular values.
func ExampleReadSpectrum() {
	sv, err := data.ReadSpectrum(strings.NewReader("eigenvalue\n4\n0.25\n9\n"), true, data.Limits{})
	fmt.Println(sv, err)
	// Output: [3 2 0.5] <nil>
}
