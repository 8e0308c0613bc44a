package main

import (
	"bytes"
	"encoding/csv"
	"image/png"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"hdrisk/engine/plot"
	"hdrisk/engine/study"
)

// sweep --figure draws the curve view's figure: the curve, the best l1 and the
// Bayes-optimal error, in each of the three formats.
func TestSweepFigure(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"a.svg", "a.png", "a.pdf"} {
		path := filepath.Join(dir, name)
		_, errs, code := runCmd(t, studyScenario, "sweep", "-", "--over", "l1", "--from", "0.001", "--to", "1", "--points", "30", "--log", "--figure", path)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", name, code, errs)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		switch filepath.Ext(name) {
		case ".svg":
			for _, want := range []string{"<svg", "best l1 = ", "Bayes-optimal", "NMSE (dB) against l1"} {
				if !bytes.Contains(data, []byte(want)) {
					t.Errorf("the SVG lacks %q", want)
				}
			}
		case ".png":
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil {
				t.Fatal(err)
			}
			// 480 x 300 points are 640 x 400 CSS pixels; the PNG has two pixels for each.
			if b := img.Bounds(); b.Dx() != 2*640 || b.Dy() != 2*400 {
				t.Errorf("PNG is %v, want 1280 x 800", b)
			}
		case ".pdf":
			if !bytes.HasPrefix(data, []byte("%PDF-")) {
				t.Errorf("not a PDF: %.20q", data)
			}
		}
	}
	for _, bad := range [][]string{{"--figure", filepath.Join(dir, "a.gif")}, {"--quantity", "nmse_db", "--log-y"}, {"--quantity", "loss"}} {
		args := append([]string{"sweep", "-", "--over", "l1", "--from", "0.01", "--to", "1", "--points", "3"}, bad...)
		if _, _, code := runCmd(t, studyScenario, args...); code != 2 {
			t.Errorf("%v: exit %d, want 2", bad, code)
		}
	}
}

// The command line's SVG is the one engine/plot draws for the same study: built here from
// the library calls the curve view makes, it must agree byte for byte.
func TestSweepFigureIsTheViewsFigure(t *testing.T) {
	path := filepath.Join(t.TempDir(), "a.svg")
	if _, errs, code := runCmd(t, studyScenario, "sweep", "-", "--over", "alpha", "--from", "0.1", "--to", "2", "--points", "40", "--figure", path); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	got, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s, err := readScenario("-", strings.NewReader(studyScenario))
	if err != nil {
		t.Fatal(err)
	}
	ax := study.Axis{Over: "alpha", From: 0.1, To: 2, Points: 40}
	pts, err := study.Sweep(t.Context(), s, study.SweepSpec{Axis: ax}, nil)
	if err != nil {
		t.Fatal(err)
	}
	l, ok := plot.SweepFigure{Scenario: s, Axis: ax, Curves: []plot.Curve{{Points: pts}}}.Line()
	if !ok {
		t.Fatal("no figure")
	}
	f, err := l.Build()
	if err != nil {
		t.Fatal(err)
	}
	want, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("the command's SVG (%d bytes) differs from the view's (%d bytes)", len(got), len(want))
	}
	if !bytes.Contains(got, []byte(">1</text>")) {
		t.Error("the m/n axis has no tick label at 1")
	}
}

// sweep --best writes the best-tuned curve, with the weight in a last column; it lies on or
// below the curve of the scenario's own l1.
func TestSweepBest(t *testing.T) {
	args := []string{"sweep", "-", "--over", "alpha", "--from", "0.2", "--to", "1.5", "--points", "6"}
	fixed, errs, code := runCmd(t, studyScenario, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	tuned, errs, code := runCmd(t, studyScenario, append(args, "--best", "l1")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	fr, _ := csv.NewReader(strings.NewReader(fixed)).ReadAll()
	tr, err := csv.NewReader(strings.NewReader(tuned)).ReadAll()
	if err != nil || len(tr) != 7 || tr[0][len(tr[0])-1] != "best_l1" {
		t.Fatalf("tuned CSV: %v, %q", err, tuned)
	}
	for i := 1; i < len(tr); i++ {
		mt, _ := strconv.ParseFloat(tr[i][1], 64)
		mf, _ := strconv.ParseFloat(fr[i][1], 64)
		w, err := strconv.ParseFloat(tr[i][len(tr[i])-1], 64)
		if err != nil || !(w > 0) {
			t.Errorf("row %d: best l1 %q", i, tr[i][len(tr[i])-1])
		}
		if mt > mf*(1+1e-6) {
			t.Errorf("alpha %s: tuned MSE %v above the MSE at l1 = 0.1 (%v)", tr[i][0], mt, mf)
		}
	}
	if _, _, code := runCmd(t, studyScenario, "sweep", "-", "--over", "l1", "--from", "0.01", "--to", "1", "--points", "3", "--best", "l1"); code != 1 {
		t.Errorf("re-tuning the swept weight: exit %d, want 1", code)
	}
}

// map --figure draws the map view's heat figure, contour levels and lowest point included.
func TestMapFigure(t *testing.T) {
	path := filepath.Join(t.TempDir(), "m.svg")
	_, errs, code := runCmd(t, studyScenario, "map", "-", "--x", "alpha", "--x-from", "0.2", "--x-to", "1.5", "--x-points", "8",
		"--y", "l1", "--y-from", "0.01", "--y-to", "1", "--y-points", "6", "--y-log", "--figure", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"lowest ", "data:image/png;base64,", "NMSE (dB)"} {
		if !bytes.Contains(data, []byte(want)) {
			t.Errorf("the map's SVG lacks %q", want)
		}
	}
}
