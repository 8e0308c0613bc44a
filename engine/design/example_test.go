package design_test

import (
	"fmt"

	"hdrisk/engine/design"
)

// A Gaussian design with twice as many rows as columns, rows scaled (entries N(0, 1/n)):
// S1(0) = E[1/lambda] = 1/(alpha - 1), and solving S1(g) = V gives the g2 of the fixed point.
func ExampleGaussian() {
	l, err := design.Gaussian(2, design.Rows)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("mean %.4f, atom at zero %.4f, S1(0) %.4f\n", l.Mean(), l.Atom0(), l.At(0).S1)
	x := l.At(1)
	fmt.Printf("at g = 1: S1 %.6f, T %.6f, W %.6f\n", x.S1, x.T, x.W)
	g, err := design.InverseS1(l, x.S1)
	fmt.Printf("InverseS1 gives back g = %.6f (error %v)\n", g, err)
	// Output:
	// mean 2.0000, atom at zero 0.0000, S1(0) 1.0000
	// at g = 1: S1 0.414214, T 0.585786, W 0.207107
	// InverseS1 gives back g = 1.000000 (error <nil>)
}

// An invented spectrum of five singular values with fewer rows than columns: the zero
// eigenvalues of F^T F form an atom of mass 1 - alpha.
func ExampleEmpiricalSV() {
	l, err := design.EmpiricalSV(0.4, []float64{3, 2.5, 1, 0.7, 0.2}, design.Columns)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("mean %.4f, atom at zero %.4f\n", l.Mean(), l.Atom0())
	_, err = design.EmpiricalSV(0.4, []float64{1, -2}, design.Columns)
	fmt.Println(err)
	// Output:
	// mean 1.0000, atom at zero 0.6000
	// values: entry 1 is -2: singular values must be finite and nonnegative
}
