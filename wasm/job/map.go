package job

import (
	"context"

	"hdrisk/engine/study"
	"hdrisk/protocol"
)

func init() { Serve(protocol.MapRows, MapRows) }

// MapRows computes rows RowFrom <= j < RowTo of a map with study.MapRows, one row at a
// time so that progress counts rows; every row starts cold, so the cells are those of
// study.Map whatever the split. Special cases are: an invalid scenario, axis or row range is
// an error naming the field.
func MapRows(a protocol.MapArgs, progress func(done, total int)) (protocol.MapResult, error) {
	s, err := decodeScenario(a.Scenario)
	if err != nil {
		return protocol.MapResult{}, err
	}
	spec := study.MapSpec{X: a.X, Y: a.Y}
	rows, err := spec.Rows(s)
	if err != nil {
		return protocol.MapResult{}, err
	}
	if a.RowFrom < 0 || a.RowTo > rows || a.RowFrom > a.RowTo {
		return protocol.MapResult{}, &study.SpecError{Field: "rows", Reason: "need 0 <= row_from <= row_to <= number of rows"}
	}
	out := protocol.MapResult{RowFrom: a.RowFrom, RowTo: a.RowTo, Cells: make(protocol.Points, 0, (a.RowTo-a.RowFrom)*a.X.Points)}
	for j := a.RowFrom; j < a.RowTo; j++ {
		pts, err := study.MapRows(context.Background(), s, spec, j, j+1)
		if err != nil {
			return protocol.MapResult{}, err
		}
		out.Cells = append(out.Cells, pts...)
		if progress != nil {
			progress(j-a.RowFrom+1, a.RowTo-a.RowFrom)
		}
	}
	return out, nil
}
