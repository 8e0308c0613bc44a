package study

import (
	"context"
	"runtime"
	"strings"
	"sync"

	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/scenario"
)

// MapSpec is a 2-D study: field X along each row, field Y from row to row.
type MapSpec struct {
	X, Y Axis
	// Solver as in SweepSpec; warm starts run along each row.
	Solver fixedpoint.Options
}

// Grid is the result of a map: Cells[j*len(X) + i] is the point at (X[i], Y[j]).
type Grid struct {
	X, Y  []float64
	Cells []Point
}

// At returns the cell at column i (X[i]) and row j (Y[j]).
func (g Grid) At(i, j int) Point { return g.Cells[j*len(g.X)+i] }

// bind resolves both axes in c and checks their ends.
func (m MapSpec) bind(c scenario.Checked) (bx, by scenario.Binding, xs, ys []float64, err error) {
	if bx, xs, err = m.X.bind(c, scenario.MaxMapPoints, "x"); err != nil {
		return bx, by, nil, nil, err
	}
	if by, ys, err = m.Y.bind(c, scenario.MaxMapPoints, "y"); err != nil {
		return bx, by, nil, nil, err
	}
	px, py := bx.Info().Path, by.Info().Path
	if px == py || (strings.HasPrefix(px, "noise.") && strings.HasPrefix(py, "noise.")) {
		return bx, by, nil, nil, specErr("y", "%s and %s state the same quantity; a map needs two different fields", m.X.Over, m.Y.Over)
	}
	return bx, by, xs, ys, nil
}

// Rows returns the number of rows (values of Y) the map has, after checking spec against s.
func (m MapSpec) Rows(s scenario.Scenario) (int, error) {
	c, err := s.Check()
	if err != nil {
		return 0, err
	}
	_, _, _, ys, err := m.bind(c)
	return len(ys), err
}

// MapRows computes the rows rowFrom <= j < rowTo of the map, row after row, and returns their
// cells in order (row-major, (rowTo - rowFrom) * len(X) points). Each row starts cold and
// warm-starts along X, so that the cells do not depend on how the rows are split: a worker
// that computes any block of rows gets the numbers Map gets.
//
// Special cases are: rowFrom = rowTo gives no cells; cells that fail or do not converge are
// marked as in Sweep. On cancellation MapRows returns the rows finished so far and
// ctx.Err(). A row range outside [0, rows] is a *SpecError.
func MapRows(ctx context.Context, s scenario.Scenario, spec MapSpec, rowFrom, rowTo int) ([]Point, error) {
	c, err := s.Check()
	if err != nil {
		return nil, err
	}
	return MapRowsChecked(ctx, c, spec, rowFrom, rowTo)
}

// MapRowsChecked is MapRows over a scenario checked already.
func MapRowsChecked(ctx context.Context, c scenario.Checked, spec MapSpec, rowFrom, rowTo int) ([]Point, error) {
	_, by, xs, ys, err := spec.bind(c)
	if err != nil {
		return nil, err
	}
	if rowFrom < 0 || rowTo > len(ys) || rowFrom > rowTo {
		return nil, specErr("rows", "need 0 <= from <= to <= %d, not from %d to %d", len(ys), rowFrom, rowTo)
	}
	out := make([]Point, 0, (rowTo-rowFrom)*len(xs))
	for j := rowFrom; j < rowTo; j++ {
		row := make([]Point, len(xs))
		if err := spec.row(ctx, by, xs, ys[j], row); err != nil {
			return out, err
		}
		out = append(out, row...)
	}
	return out, nil
}

// row fills one row of cells at Y = y, with Y bound in by: X is bound once per row, in the
// scenario at that y.
func (m MapSpec) row(ctx context.Context, by scenario.Binding, xs []float64, y float64, row []Point) error {
	var bx scenario.Binding
	cy, yerr := by.At(y)
	if yerr == nil {
		bx, yerr = cy.Bind(m.X.Over)
	}
	w := walker{opt: m.Solver, extrapolate: true}
	for i, x := range xs {
		if err := ctx.Err(); err != nil {
			return err
		}
		var p Point
		if yerr != nil {
			p = Point{Failed: yerr.Error()}
		} else {
			p = w.solve(bx.At(x))
		}
		p.X, p.Y = x, y
		row[i] = p
	}
	return nil
}

// Map computes the whole grid with the given number of goroutines (workers <= 0: one per
// available CPU), handing out rows one at a time. progress, if not nil, is called from the
// calling goroutine after each row with the number of cells done.
//
// Special cases are: the cells are identical for every number of workers (see MapRows); on
// cancellation Map waits for the workers to stop and returns an empty Grid and ctx.Err().
func Map(ctx context.Context, s scenario.Scenario, spec MapSpec, workers int, progress Progress) (Grid, error) {
	c, err := s.Check()
	if err != nil {
		return Grid{}, err
	}
	return MapChecked(ctx, c, spec, workers, progress)
}

// MapChecked is Map over a scenario checked already.
func MapChecked(ctx context.Context, c scenario.Checked, spec MapSpec, workers int, progress Progress) (Grid, error) {
	_, by, xs, ys, err := spec.bind(c)
	if err != nil {
		return Grid{}, err
	}
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(ys))
	g := Grid{X: xs, Y: ys, Cells: make([]Point, len(xs)*len(ys))}
	rows := make(chan int)
	done := make(chan error)
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for j := range rows {
				done <- spec.row(ctx, by, xs, ys[j], g.Cells[j*len(xs):(j+1)*len(xs)])
			}
		})
	}
	go func() {
		defer close(rows)
		for j := range ys {
			select {
			case rows <- j:
			case <-ctx.Done():
				return
			}
		}
	}()
	go func() {
		wg.Wait()
		close(done)
	}()
	finished := 0
	var firstErr error
	for err := range done {
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		finished++
		if progress != nil && firstErr == nil {
			progress(finished*len(xs), len(g.Cells))
		}
	}
	if firstErr == nil {
		firstErr = ctx.Err()
	}
	if firstErr != nil {
		return Grid{}, firstErr
	}
	return g, nil
}
