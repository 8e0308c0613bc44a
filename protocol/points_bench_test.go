package protocol

import (
	"encoding/json"
	"testing"
)

// BenchmarkDecodeMapBlock takes in one finished block of a 100 x 100 map (50 rows over two
// workers) as the page does on its main thread: the worker's reply (posted without its
// result), then the result. Its time is most of the page's longest stall while a map runs.
func BenchmarkDecodeMapBlock(b *testing.B) {
	cells := make(Points, 5000)
	for i := range cells {
		cells[i].X, cells[i].Y = float64(i)*0.37, float64(i)*1.1
		cells[i].Result.MSE = 0.1234567 * float64(i)
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
