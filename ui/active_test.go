package ui

import (
	"strings"
	"testing"

	"github.com/vugu/vugu"
)

// lockless is the event environment of a native build: tests run on one goroutine.
type lockless struct{}

func (lockless) Lock()         {}
func (lockless) UnlockOnly()   {}
func (lockless) UnlockRender() {}
func (lockless) RLock()        {}
func (lockless) RUnlock()      {}

// pageBuild builds the page as the browser's render loop does, one pass per call.
type pageBuild struct {
	t    *testing.T
	env  *vugu.BuildEnv
	root *Root
	res  *vugu.BuildResults
}

func newPageBuild(t *testing.T, root *Root) *pageBuild {
	env, err := vugu.NewBuildEnv(lockless{})
	if err != nil {
		t.Fatal(err)
	}
	return &pageBuild{t: t, env: env, root: root}
}

func (p *pageBuild) run() { p.res = p.env.RunBuild(p.root) }

// view returns the component of type T the last pass built under the root.
func pageView[T any](p *pageBuild) T {
	p.t.Helper()
	for _, c := range p.res.ResultFor(p.root).Components {
		if v, ok := c.(T); ok {
			return v
		}
	}
	var zero T
	p.t.Fatalf("no %T in the page", zero)
	return zero
}

// elements counts the elements a component built inside its own root element.
func (p *pageBuild) elements(c any) int {
	out := p.res.ResultFor(c)
	if out == nil || len(out.Out) == 0 {
		return 0
	}
	n := 0
	var walk func(*vugu.VGNode)
	walk = func(v *vugu.VGNode) {
		for ch := v.FirstChild; ch != nil; ch = ch.NextSibling {
			if ch.Type == vugu.ElementNode {
				n++
			}
			walk(ch)
		}
	}
	walk(out.Out[0])
	return n
}

// text is every text a component built, joined by spaces.
func (p *pageBuild) text(c any) string {
	var b strings.Builder
	var walk func(*vugu.VGNode)
	walk = func(v *vugu.VGNode) {
		if v.Type == vugu.TextNode {
			b.WriteString(v.Data + " ")
		}
		if v.InnerHTML != nil {
			b.WriteString(*v.InnerHTML + " ")
		}
		for ch := v.FirstChild; ch != nil; ch = ch.NextSibling {
			walk(ch)
		}
	}
	if out := p.res.ResultFor(c); out != nil {
		for _, o := range out.Out {
			walk(o)
		}
	}
	return b.String()
}

// TestOnlyTheSelectedViewIsBuilt: the views of the tabs not selected build their root
// element only, and keep their state (settings, a running job's result) for when their tab
// is selected again.
func TestOnlyTheSelectedViewIsBuilt(t *testing.T) {
	jobs := &queueJobs{}
	root := &Root{Eval: &recorder{}, Jobs: jobs}
	p := newPageBuild(t, root)
	p.run()
	curve, mapv := pageView[*CurveView](p), pageView[*Mapview](p)
	if p.elements(curve) < 10 || p.elements(mapv) != 0 {
		t.Fatalf("curve tab selected: the curve built %d elements, the map %d; want the curve's markup and none of the map's",
			p.elements(curve), p.elements(mapv))
	}
	for _, v := range []any{pageView[*PlanView](p), pageView[*CheckView](p), pageView[*DataView](p), pageView[*Share](p)} {
		if n := p.elements(v); n != 0 {
			t.Errorf("%T built %d elements behind a tab that is not selected", v, n)
		}
	}

	// A sweep started, then its tab left: the result arrives while the curve is hidden.
	if err := curve.Set("points", "30"); err != nil {
		t.Fatal(err)
	}
	curve.Start()
	if curve.Run() != RunRunning {
		t.Fatalf("the sweep did not start: %s", curve.Problem())
	}
	root.showTab("map")
	p.run()
	if pageView[*CurveView](p) != curve {
		t.Fatal("the curve view was made anew when its tab was left; its state is lost")
	}
	if p.elements(curve) != 0 || p.elements(mapv) < 10 {
		t.Errorf("map tab selected: the curve built %d elements, the map %d", p.elements(curve), p.elements(mapv))
	}
	jobs.flush()
	p.run()
	if curve.Run() != RunDone {
		t.Fatalf("the sweep finished while hidden in state %s: %s", curve.Run(), curve.Problem())
	}
	root.showTab("curve")
	p.run()
	if pageView[*CurveView](p) != curve {
		t.Fatal("the curve view was made anew when its tab came back")
	}
	if got := p.text(curve); !strings.Contains(got, "30 points in") || !strings.Contains(got, "Best l1") {
		t.Errorf("the curve shown again lacks its result: %q", got)
	}
	if p.elements(mapv) != 0 {
		t.Errorf("the map still builds %d elements behind its tab", p.elements(mapv))
	}
}
