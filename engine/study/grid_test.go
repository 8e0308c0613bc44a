package study

import (
	"context"
	"errors"
	"math"
	"sync/atomic"
	"testing"
)

func testMap() MapSpec {
	return MapSpec{
		X: Axis{Over: "alpha", From: 0.2, To: 1.5, Points: 7},
		Y: Axis{Over: "l1", From: 1e-3, To: 3, Points: 9, Log: true},
	}
}

func sameBits(a, b Point) bool {
	ra, rb := a.Result, b.Result
	eq := func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) }
	return eq(a.X, b.X) && eq(a.Y, b.Y) && a.Failed == b.Failed && eq(ra.MSE, rb.MSE) && eq(ra.G1, rb.G1) &&
		eq(ra.T1, rb.T1) && eq(ra.TrainError, rb.TrainError) && ra.Iterations == rb.Iterations && ra.Converged == rb.Converged
}

// The cells of a map do not depend on the number of workers nor on how the rows are split.
func TestMapDeterministic(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	spec := testMap()
	ref, err := Map(context.Background(), s, spec, 1, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(ref.Cells) != 63 || len(ref.X) != 7 || len(ref.Y) != 9 {
		t.Fatalf("grid %d x %d with %d cells", len(ref.X), len(ref.Y), len(ref.Cells))
	}
	for j, y := range ref.Y {
		for i, x := range ref.X {
			c := ref.At(i, j)
			if c.X != x || c.Y != y || !c.OK() {
				t.Fatalf("cell (%d, %d) at (%v, %v): %s", i, j, c.X, c.Y, c.Status())
			}
		}
	}
	for _, w := range []int{2, 3, 0} {
		g, err := Map(context.Background(), s, spec, w, nil)
		if err != nil {
			t.Fatal(err)
		}
		for k := range g.Cells {
			if !sameBits(g.Cells[k], ref.Cells[k]) {
				t.Fatalf("workers %d: cell %d differs: %+v vs %+v", w, k, g.Cells[k], ref.Cells[k])
			}
		}
	}
	var blocks []Point
	for _, b := range [][2]int{{0, 2}, {2, 3}, {3, 3}, {3, 9}} {
		pts, err := MapRows(context.Background(), s, spec, b[0], b[1])
		if err != nil {
			t.Fatal(err)
		}
		blocks = append(blocks, pts...)
	}
	for k := range blocks {
		if !sameBits(blocks[k], ref.Cells[k]) {
			t.Fatalf("row blocks: cell %d differs", k)
		}
	}
	// Each cell agrees with the same scenario solved on its own.
	for _, k := range []int{0, 20, 62} {
		c := ref.Cells[k]
		sc, _ := s.With("alpha", c.X)
		sc, _ = sc.With("l1", c.Y)
		if d := relDiff(c.Result.MSE, solveCold(t, sc).MSE); d > 1e-7 {
			t.Errorf("cell %d: MSE differs from a cold solve by %.2g", k, d)
		}
	}
}

func TestMapProgressAndCancel(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	spec := testMap()
	var last, calls int
	_, err := Map(context.Background(), s, spec, 2, func(done, total int) {
		calls++
		if total != 63 || done <= last || done%7 != 0 {
			t.Errorf("progress %d of %d after %d", done, total, last)
		}
		last = done
	})
	if err != nil || calls != 9 || last != 63 {
		t.Fatalf("err %v, %d calls, last %d", err, calls, last)
	}
	ctx, cancel := context.WithCancel(context.Background())
	var n atomic.Int32
	g, err := Map(ctx, s, spec, 2, func(done, total int) {
		if n.Add(1) == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) || g.Cells != nil {
		t.Fatalf("after cancel: err %v, %d cells", err, len(g.Cells))
	}
	// Cancelled after the second of nine rows, the map stops part-way: rows already handed
	// out stop at their next cell instead of reporting progress.
	if rows := n.Load(); rows >= 9 {
		t.Errorf("all %d rows were computed after the cancel at row 2", rows)
	}
	// MapRows returns the rows finished before the cancel, whole.
	ctx, cancel = context.WithCancel(context.Background())
	cancel()
	cells, err := MapRows(ctx, s, spec, 0, 9)
	if !errors.Is(err, context.Canceled) || len(cells) != 0 {
		t.Errorf("MapRows cancelled before it starts: %d cells, %v", len(cells), err)
	}
}

func TestMapSpecErrors(t *testing.T) {
	s := scen(t, gaussDesign(0.5, "rows"), bgSignal(0.1, 1), 0.01, lasso(0.1))
	for _, spec := range []MapSpec{
		{X: Axis{Over: "l1", From: 0.1, To: 1, Points: 3}, Y: Axis{Over: "penalty.l1", From: 0.1, To: 1, Points: 3}},
		{X: Axis{Over: "noise", From: 0.1, To: 1, Points: 3}, Y: Axis{Over: "snr_db", From: 0, To: 10, Points: 3}},
		{X: Axis{Over: "l1", From: 0.1, To: 1, Points: 3}, Y: Axis{Over: "alpha", From: 0.1, To: 1, Points: 5000}},
	} {
		if _, err := Map(context.Background(), s, spec, 1, nil); err == nil {
			t.Errorf("%+v: no error", spec)
		}
	}
	if _, err := MapRows(context.Background(), s, testMap(), 3, 10); err == nil {
		t.Error("rows 3 to 10 of 9: no error")
	}
}
