package ui

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/vugu/vugu"

	"hdrisk/engine/scenario"
)

// rendererBuffer is the size of the buffer vugu's DOM renderer passes each attribute,
// property and text through (domrender/renderer-js.go, vugu v0.4.0); a longer one stops the
// page.
const rendererBuffer = 16384

// longest builds the whole page natively, as the renderer would receive it, and returns
// the longest attribute, property or text with where it sits.
func longest(t *testing.T, root *Root) (int, string) {
	t.Helper()
	env, err := vugu.NewBuildEnv()
	if err != nil {
		t.Fatal(err)
	}
	res := env.RunBuild(root)
	most, where := 0, ""
	note := func(n int, what string) {
		if n > most {
			most, where = n, what
		}
	}
	var walk func(n *vugu.VGNode)
	walk = func(n *vugu.VGNode) {
		for ; n != nil; n = n.NextSibling {
			if n.Component != nil {
				if out := res.ResultFor(n.Component); out != nil {
					for _, o := range out.Out {
						walk(o)
					}
				}
				continue
			}
			if n.Type == vugu.TextNode {
				note(len(n.Data), "text under <"+parentTag(n)+">")
			}
			for _, a := range n.Attr {
				note(len(a.Val), "<"+n.Data+" "+a.Key+">")
			}
			for _, p := range n.Prop {
				note(len(p.JSONVal), "<"+n.Data+" ."+p.Key+">")
			}
			walk(n.FirstChild)
		}
	}
	for _, o := range res.Out.Out {
		walk(o)
	}
	return most, where
}

func parentTag(n *vugu.VGNode) string {
	if n.Parent == nil {
		return "?"
	}
	return n.Parent.Data
}

// A scenario with 2000 full-precision singular values and 2000 signal samples opens in
// the editor, evaluates, and nothing the page then renders comes near the renderer's
// buffer; the editor states each list in one line and replacing one works.
func TestLongListsStayUnderTheRendererBuffer(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	values := func(n int) []float64 {
		v := make([]float64, n)
		for i := range v {
			v[i] = 0.05 + 3*rng.Float64()
		}
		return v
	}
	s := scenario.Scenario{Kind: scenario.Kind, Version: scenario.Version, Title: "invented example: a long measured spectrum",
		Design:  scenario.Design{Shape: "empirical-sv", Alpha: 0.5, Scale: scenario.ScaleRows, Lists: map[string][]float64{"values": values(2000)}},
		Signal:  scenario.Signal{Law: "empirical", Lists: map[string][]float64{"values": values(2000)}},
		Noise:   scenario.Noise{Variance: 0.01},
		Penalty: scenario.Penalty{Kind: "l1", Params: map[string]float64{"l1": 0.1}},
	}
	br := &keepBrowser{}
	root := &Root{Eval: &recorder{}, Browser: br}
	root.Init(nil)
	if err := root.Reload(s); err != nil {
		t.Fatal(err)
	}
	if root.checked.Err != nil {
		t.Fatalf("the scenario does not check: %v", root.checked.Err)
	}
	if n, where := longest(t, root); n > rendererBuffer/2 {
		t.Errorf("the page renders %d bytes in one piece (%s), too near the renderer's %d", n, where, rendererBuffer)
	}

	e := &Editor{Model: root.Model}
	var f Field
	for _, x := range root.Model.Fields("design") {
		if x.List {
			f = x
		}
	}
	if !compact(f) || e.boxText(f) != "" || !e.locked(f) {
		t.Fatalf("a list of %d characters should be summed up and locked", len(f.Text))
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range s.Design.Lists["values"] {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if sum := e.listSummary(f); !strings.HasPrefix(sum, "2000 values, from "+num4(lo)+" to "+num4(hi)) || e.listCount(f) != "2000" {
		t.Errorf("summary %q, count %s", sum, e.listCount(f))
	}
	e.toggleReplace(f)
	if e.locked(f) || e.boxText(f) != "" || e.replaceLabel(f) != "Keep the listed values" {
		t.Errorf("after Replace: locked %v", e.locked(f))
	}
	e.toggleReplace(f)
	if !e.locked(f) {
		t.Error("Keep should lock the list again")
	}
	e.toggleReplace(f)
	if err := root.Model.SetText(f.ID, "1, 0.5, 0.25"); err != nil {
		t.Fatal(err)
	}
	f = root.Model.Fields("design")[len(root.Model.Fields("design"))-1]
	if compact(f) || e.boxText(f) != "1, 0.5, 0.25" || e.locked(f) {
		t.Errorf("a short list typed in its place should show in its box: %q", e.boxText(f))
	}
	if ch := root.Model.Check(); ch.Err != nil || len(ch.Scenario.Design.Lists["values"]) != 3 {
		t.Errorf("the typed list is not the scenario's: %v", ch.Err)
	}
}
