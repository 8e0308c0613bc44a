package job

import (
	"context"
	"encoding/json"
	"errors"

	"hdrisk/engine/study"
)

// MapArgs are the arguments of the "map_rows" kind: a scenario file, the two axes of the
// map (X along a row, Y from row to row) and the block of rows to compute, From <= j < To.
type MapArgs struct {
	Scenario json.RawMessage `json:"scenario"`
	X        Axis            `json:"x"`
	Y        Axis            `json:"y"`
	RowFrom  int             `json:"row_from"`
	RowTo    int             `json:"row_to"`
}

// MapResult is the result of the "map_rows" kind: the cells of the block, row after row
// (X fastest), and the block's place in the map.
type MapResult struct {
	RowFrom int    `json:"row_from"`
	RowTo   int    `json:"row_to"`
	Cells   []Cell `json:"cells"`
}

func init() { Register("map_rows", runMapRows) }

// MapRows computes rows RowFrom <= j < RowTo of a map with study.MapRows, one row at a
// time so that progress counts rows; every row starts cold, so the cells are those of
// study.Map whatever the split. Special cases are: an invalid scenario, axis or row range is
// an error naming the field.
func MapRows(a MapArgs, progress func(done, total int)) (MapResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return MapResult{}, err
	}
	spec := study.MapSpec{X: a.X.study(), Y: a.Y.study()}
	rows, err := spec.Rows(s)
	if err != nil {
		return MapResult{}, err
	}
	if a.RowFrom < 0 || a.RowTo > rows || a.RowFrom > a.RowTo {
		return MapResult{}, &study.SpecError{Field: "rows", Reason: "need 0 <= row_from <= row_to <= number of rows"}
	}
	out := MapResult{RowFrom: a.RowFrom, RowTo: a.RowTo, Cells: make([]Cell, 0, (a.RowTo-a.RowFrom)*a.X.Points)}
	for j := a.RowFrom; j < a.RowTo; j++ {
		pts, err := study.MapRows(context.Background(), s, spec, j, j+1)
		if err != nil {
			return MapResult{}, err
		}
		for _, p := range pts {
			out.Cells = append(out.Cells, CellOf(p))
		}
		if progress != nil {
			progress(j-a.RowFrom+1, a.RowTo-a.RowFrom)
		}
	}
	return out, nil
}

func runMapRows(raw json.RawMessage, progress func(done, total int)) (any, error) {
	var a MapArgs
	if err := json.Unmarshal(raw, &a); err != nil {
		return nil, errors.New("map_rows arguments: " + err.Error())
	}
	return MapRows(a, progress)
}
