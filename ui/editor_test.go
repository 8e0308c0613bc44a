package ui

import (
	"fmt"
	"slices"
	"strings"
	"testing"

	"hdrisk/engine/design"
	"hdrisk/engine/signal"
)

func decodeSVG(t *testing.T, what string, p lawPlot) string {
	t.Helper()
	b := p.svg
	if !strings.Contains(string(b), "<svg") {
		t.Fatalf("%s: not an SVG document", what)
	}
	if p.Alt == "" {
		t.Errorf("%s: no text alternative", what)
	}
	return string(b)
}

// Every menu choice of the design and the signal, with its starting inputs, can be drawn.
func TestEveryLawIsDrawn(t *testing.T) {
	for _, g := range []string{"design", "signal"} {
		grp, _ := FindGroup(g)
		for _, k := range grp.Kinds {
			m := NewModel()
			_ = m.SetKind(g, k.Name)
			c := m.Check()
			if c.Err != nil {
				t.Fatalf("%s %s: %v", g, k.Name, c.Err)
			}
			var p lawPlot
			var err error
			if g == "design" {
				p, err = designPlot(c.Problem.Design)
			} else {
				p, err = signalPlot(c.Problem.Signal)
			}
			if err != nil {
				t.Errorf("%s %s: %v", g, k.Name, err)
				continue
			}
			decodeSVG(t, g+" "+k.Name, p)
		}
	}
}

// The orthogonal design has one nonzero singular value, drawn as one atom; a Marchenko-Pastur
// spectrum as a histogram over its support (quantile midpoints, so just inside it), whose edges for alpha = 0.25 with rows scale
// (entries N(0, 1/n), Marchenko and Pastur 1967) are 1 +- sqrt(alpha) = 0.5 and 1.5.
func TestDesignPlotShapes(t *testing.T) {
	o, err := design.Orthogonal(0.4, design.Rows)
	if err != nil {
		t.Fatal(err)
	}
	p, err := designPlot(o)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(p.Alt, "160 x 400") || !strings.Contains(p.Alt, "from 1 to 1") {
		t.Errorf("orthogonal: alt %q", p.Alt)
	}
	g, err := design.Gaussian(0.25, design.Rows)
	if err != nil {
		t.Fatal(err)
	}
	p, err = designPlot(g)
	if err != nil {
		t.Fatal(err)
	}
	sv := g.SingularValues(100, 400)
	lo, hi := slices.Min(sv), slices.Max(sv)
	if !strings.Contains(p.Alt, "100 x 400") || !strings.Contains(p.Alt, fmt.Sprintf("from %.3g to %.3g", lo, hi)) {
		t.Errorf("gaussian: alt %q", p.Alt)
	}
	if lo < 0.5 || hi > 1.5 || lo > 0.55 || hi < 1.45 {
		t.Errorf("gaussian: singular values from %v to %v, want inside and near [0.5, 1.5]", lo, hi)
	}
}

// A sparse law shows its atom at zero with its probability; a law known by a discretization
// with atoms (uniform) is drawn from samples instead.
func TestSignalPlotAtoms(t *testing.T) {
	l, err := signal.BernoulliGauss(0.1, 1)
	if err != nil {
		t.Fatal(err)
	}
	p, err := signalPlot(l)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(p.Alt, "1 point mass(es), the largest 0.9 at 0") || !strings.Contains(p.Alt, "probability 0.1") {
		t.Errorf("bernoulli-gauss: alt %q", p.Alt)
	}
	u, err := signal.Uniform(2)
	if err != nil {
		t.Fatal(err)
	}
	if p, err = signalPlot(u); err != nil || !strings.Contains(p.Alt, "draws") {
		t.Errorf("uniform: %v, alt %q", err, p.Alt)
	}
}

func TestFieldMarks(t *testing.T) {
	e := &Editor{Model: NewModel(), Invalid: map[string]string{"in-design-alpha": "design.alpha: bad"}}
	if e.invalidText("in-design-alpha") != "true" || e.invalidText("in-noise-variance") != "false" {
		t.Errorf("aria-invalid wrong")
	}
	if e.describedBy("in-design-alpha") != "err-in-design-alpha help-in-design-alpha" || e.describedBy("in-noise-variance") != "help-in-noise-variance" {
		t.Errorf("aria-describedby wrong")
	}
	e.PlotsStale = true
	if c := e.caption("Law", lawPlot{URL: "data:x"}); !strings.Contains(c, "last valid scenario") {
		t.Errorf("stale caption %q", c)
	}
	if capital("share of the entries.") != "Share of the entries" {
		t.Errorf("capital: %q", capital("share of the entries."))
	}
}
