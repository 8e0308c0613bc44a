package job

import (
	"encoding/json"
	"os"
	"testing"
	"time"

	"hdrisk/protocol"
)

func TestSpectrumBig(t *testing.T) {
	b, err := os.ReadFile("/tmp/m1500.csv")
	if err != nil {
		t.Skip(err)
	}
	t0 := time.Now()
	req, _ := json.Marshal(protocol.SpectrumArgs{Source: protocol.SourceMatrix, Text: string(b), MaxBytes: 1 << 30})
	t1 := time.Now()
	var a protocol.SpectrumArgs
	if err := json.Unmarshal(req, &a); err != nil {
		t.Fatal(err)
	}
	t2 := time.Now()
	last := time.Now()
	lastStep := ""
	r, err := Spectrum(a, func(done, total int) {
		st := protocol.SpectrumStep(done)
		if st != lastStep {
			t.Logf("step %v starts after %.2fs", st, time.Since(last).Seconds())
			last, lastStep = time.Now(), st
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("marshal %.2fs unmarshal %.2fs read %.2fs svd %.2fs total %.2fs", t1.Sub(t0).Seconds(), t2.Sub(t1).Seconds(), float64(r.ReadSeconds), float64(r.SVDSeconds), time.Since(t0).Seconds())
}
