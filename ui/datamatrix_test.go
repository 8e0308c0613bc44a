package ui

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// sizedJobs is cdJobs with a number of workers, as the page's pool has.
type sizedJobs struct {
	cdJobs
	size int
}

func (j *sizedJobs) Size() int { return j.size }

// invented40x80 is an invented 40 x 80 Gaussian matrix as CSV text.
func invented40x80() string {
	rng := rand.New(rand.NewPCG(8, 8))
	var b strings.Builder
	for i := 0; i < 40; i++ {
		for j := 0; j < 80; j++ {
			if j > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "%.6g", rng.NormFloat64()/math.Sqrt(40))
		}
		b.WriteString("\n")
	}
	return b.String()
}

// A matrix used as the design locks m/n in the editor to its shape; unlocking frees it and
// turns the check with the matrix off.
func TestMatrixDesignLocksAlpha(t *testing.T) {
	m := lassoModel(t)
	br := &cdBrowser{fileName: "invented.csv", file: []byte(invented40x80())}
	c := &DataView{Model: m, Jobs: &cdJobs{run: true}, Browser: br}
	c.start()
	c.ReadFile("design")
	c.UseDesign()
	u := m.MatrixDesign()
	if u == nil || u.Rows != 40 || u.Cols != 80 || u.Name != "invented.csv" || c.Locked() != u {
		t.Fatalf("matrix design %+v", u)
	}
	e := &Editor{Model: m}
	var alpha Field
	for _, f := range m.Fields("design") {
		if f.Path == "design.alpha" {
			alpha = f
		}
	}
	if alpha.Text != "0.5" || !e.locked(alpha) || !strings.Contains(e.helpText(alpha), "Locked") {
		t.Errorf("alpha %q locked %v help %q", alpha.Text, e.locked(alpha), e.helpText(alpha))
	}
	if !strings.Contains(c.Applied("design"), "locked") {
		t.Errorf("applied %q", c.Applied("design"))
	}
	c.UnlockAlpha()
	if m.MatrixDesign() != nil || e.locked(alpha) || !strings.Contains(c.Applied("design"), "no longer your matrix") {
		t.Errorf("after unlock: design matrix %v, locked %v, %q", m.MatrixDesign(), e.locked(alpha), c.Applied("design"))
	}
}

// The check view holds the user's matrix fixed: n is its column count, the trials start at
// 200, the verdict is shown, and the numbers are the same on one worker and on three.
func TestCheckWithMatrix(t *testing.T) {
	var results []map[string]string
	for _, workers := range []int{1, 3} {
		m := lassoModel(t)
		d := &DataView{Model: m, Jobs: &cdJobs{run: true}, Browser: &cdBrowser{fileName: "invented.csv", file: []byte(invented40x80())}}
		d.start()
		d.ReadFile("design")
		d.UseDesign()
		jobs := &sizedJobs{cdJobs: cdJobs{run: true}, size: workers}
		c := &CheckView{Model: m, Jobs: jobs}
		c.checkStart()
		if c.NText() != "80" || c.TrialsText() != "200" || c.Matrix() == nil {
			t.Fatalf("n %q trials %q", c.NText(), c.TrialsText())
		}
		_ = c.SetSetting("trials", "30")
		c.Start()
		if c.Run() != RunDone || c.Problem() != "" {
			t.Fatalf("%d workers: run %s problem %q", workers, c.Run(), c.Problem())
		}
		if len(jobs.started) != workers {
			t.Errorf("%d workers: %d jobs started", workers, len(jobs.started))
		}
		f := dataFacts(c.MatrixFacts())
		if f["check_agrees"] == "" || f["check_z"] == "" || f["check_rotated_mean_mse"] == "" {
			t.Errorf("%d workers: verdict facts %v", workers, f)
		}
		r, _ := c.Latest()
		if r.Trials != 30 || r.N != 80 || r.Factors != "matrix" {
			t.Errorf("%d workers: %d trials, n %d, factors %s", workers, r.Trials, r.N, r.Factors)
		}
		results = append(results, f)
		recs, err := csv.NewReader(bytes.NewReader(c.CSV())).ReadAll()
		if err != nil || len(recs) != 31 || !strings.HasSuffix(strings.Join(recs[0], ","), "rotated_mse,rotated_mean_mse,rotated_stderr,z,agrees,solver_note,warnings") ||
			recs[1][len(recs[1])-3] == "" || recs[1][len(recs[1])-7] == "" {
			t.Errorf("%d workers: CSV (%v) of %d lines, first %q", workers, err, len(recs), recs[:min(len(recs), 2)])
		}
		_ = c.SetSetting("matrix", "off")
		if c.Matrix() != nil || c.NText() == "80" && c.nText != "80" {
			t.Errorf("matrix off: %v, n %q", c.Matrix(), c.NText())
		}
	}
	for k, v := range results[0] {
		if results[1][k] != v {
			t.Errorf("%s: %s on one worker, %s on three", k, v, results[1][k])
		}
	}
}

// A binary file chosen in the data tab is refused by its first bytes, before any job starts.
func TestDataRefusesBinaryFile(t *testing.T) {
	jobs := &cdJobs{run: true}
	br := &cdBrowser{fileName: "book.xlsx", file: append([]byte("PK\x03\x04"), make([]byte, 1<<20)...)}
	c := &DataView{Model: lassoModel(t), Jobs: jobs, Browser: br}
	c.start()
	c.ReadFile("design")
	if c.DesignRun() != RunError || !strings.Contains(c.Problem("design"), "book.xlsx: the file is a ZIP archive") || len(jobs.started) != 0 {
		t.Errorf("run %s, problem %q, jobs %v", c.DesignRun(), c.Problem("design"), jobs.started)
	}
}
