package protocol

import (
	"encoding/json"
	"reflect"
	"testing"
)

// BenchmarkDecodeMapBlock takes in one finished block of a 100 x 100 map (50 rows over two
// workers) as the page does on its main thread: the worker's reply (posted without its
// result), then the result. Its time is most of the page's longest stall while a map runs.
func BenchmarkDecodeMapBlock(b *testing.B) {
	cells := make(Points, 5000)
	// Every float of a cell is set, as for a generalized model: no column is left out.
	for i := range cells {
		cells[i].X, cells[i].Y = float64(i)*0.37, float64(i)*1.1
		r := reflect.ValueOf(&cells[i].Result).Elem()
		for k := range r.NumField() {
			if f := r.Field(k); f.Kind() == reflect.Float64 {
				f.SetFloat(0.1234567 * float64(i+k))
			}
		}
	}
	res, _ := Marshal(MapResult{RowFrom: 0, RowTo: 50, Cells: cells})
	rep, _ := json.Marshal(Reply{ID: 1, Type: Result})
	b.Logf("result %d bytes", len(res))
	b.ResetTimer()
	for range b.N {
		var r Reply
		if err := json.Unmarshal(rep, &r); err != nil {
			b.Fatal(err)
		}
		if _, err := MapRows.DecodeResult(res); err != nil {
			b.Fatal(err)
		}
	}
}
