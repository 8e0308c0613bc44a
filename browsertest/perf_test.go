package browsertest

import (
	"cmp"
	"context"
	"fmt"
	"os"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/profiler"
	"github.com/chromedp/chromedp"
)

// keyTime is what the page measured of one key: from the key going down to the last render
// of the page root (its data-state set, the figures and plots in the DOM) and to the frame
// after it, and how many renders the key caused.
type keyTime struct {
	DOM     float64 `json:"dom"`     // ms from keydown to the last render that was not busy
	Painted float64 `json:"painted"` // ms from keydown to a frame after the last render
	Renders int     `json:"renders"` // renders of the page root after the key
}

// keyWatch starts watching the next key pressed in the page: every render of the page root
// sets its data-state attribute, which a MutationObserver counts and times.
func (b *browser) keyWatch(t *testing.T) {
	t.Helper()
	const js = `(()=>{const root=document.getElementById("hdrisk");const k={t0:0,dom:0,painted:0,renders:0};
		if(window.hdriskKey)window.hdriskKey.stop();window.hdriskKey=k;
		document.addEventListener("keydown",()=>{k.t0=performance.now()},{capture:true,once:true});
		const mo=new MutationObserver(recs=>{if(!k.t0)return;k.renders+=recs.length;const now=performance.now()-k.t0;
			if(root.getAttribute("data-state")!=="busy")k.dom=now;
			requestAnimationFrame(()=>setTimeout(()=>{k.painted=performance.now()-k.t0}))});
		mo.observe(root,{attributes:true,attributeFilter:["data-state"]});k.stop=()=>mo.disconnect();return true})()`
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(js, nil)); err != nil {
		t.Fatalf("watching the key: %v", err)
	}
}

// keyRead waits until the page has shown the result of the watched key (a render painted,
// the page no longer busy) and returns what it measured.
func (b *browser) keyRead(t *testing.T) keyTime {
	t.Helper()
	var shown bool
	if err := chromedp.Run(b.ctx, chromedp.Poll(`(k=>k&&k.painted>0&&document.getElementById("hdrisk").getAttribute("data-state")!=="busy"?true:null)(window.hdriskKey)`,
		&shown, chromedp.WithPollingInterval(5*time.Millisecond), chromedp.WithPollingTimeout(20*time.Second))); err != nil {
		t.Fatalf("the watched key was never shown: %v", err)
	}
	var k keyTime
	if err := chromedp.Run(b.ctx, chromedp.Evaluate(`(k=>{k.stop();return {dom:k.dom,painted:k.painted,renders:k.renders}})(window.hdriskKey)`, &k)); err != nil {
		t.Fatalf("reading the key's timing: %v", err)
	}
	return k
}

// profileOn reports whether HDRISK_PROFILE asks for a CPU profile of name.
func profileOn(name string) bool {
	for _, n := range strings.Split(os.Getenv("HDRISK_PROFILE"), ",") {
		if n == name || n == "all" {
			return true
		}
	}
	return false
}

// profile runs f under the page's sampling CPU profiler when HDRISK_PROFILE names name (or
// is "all"), and logs the functions with the most samples: self time and total time (the
// function anywhere on the stack). A page built without -s keeps the Go function names.
func (b *browser) profile(t *testing.T, name string, f func()) {
	t.Helper()
	if !profileOn(name) {
		f()
		return
	}
	if err := chromedp.Run(b.ctx, profiler.Enable(), profiler.SetSamplingInterval(100), profiler.Start()); err != nil {
		t.Fatalf("profiler: %v", err)
	}
	f()
	var p *profiler.Profile
	if err := chromedp.Run(b.ctx, chromedp.ActionFunc(func(ctx2 context.Context) error {
		var err error
		p, err = profiler.Stop().Do(ctx2)
		return err
	})); err != nil || p == nil {
		t.Fatalf("profiler: %v", err)
	}
	parent := map[int64]int64{}
	byID := map[int64]*profiler.ProfileNode{}
	for _, n := range p.Nodes {
		byID[n.ID] = n
		for _, c := range n.Children {
			parent[c] = n.ID
		}
	}
	fn := func(n *profiler.ProfileNode) string {
		if n.CallFrame.FunctionName == "" {
			return "(anonymous " + shareClip(n.CallFrame.URL, 40) + ")"
		}
		return n.CallFrame.FunctionName
	}
	self, total := map[string]int64{}, map[string]int64{}
	var all int64
	for _, n := range p.Nodes {
		if n.HitCount == 0 {
			continue
		}
		all += n.HitCount
		self[fn(n)] += n.HitCount
		seen := map[string]bool{}
		for id, ok := n.ID, true; ok; id, ok = parent[id] {
			name := fn(byID[id])
			if !seen[name] {
				seen[name] = true
				total[name] += n.HitCount
			}
		}
	}
	ms := float64(p.EndTime-p.StartTime) / 1000 / float64(max(all, 1))
	top := func(m map[string]int64, k int) string {
		names := slices.Collect(func(yield func(string) bool) {
			for n := range m {
				if !yield(n) {
					return
				}
			}
		})
		slices.SortFunc(names, func(a, b string) int { return cmp.Compare(m[b], m[a]) })
		var sb strings.Builder
		for i, n := range names {
			if i == k {
				break
			}
			fmt.Fprintf(&sb, "\n  %7.1f ms  %s", float64(m[n])*ms, n)
		}
		return sb.String()
	}
	t.Logf("profile %s: %.0f ms sampled\nself:%s\ntotal:%s", name, float64(p.EndTime-p.StartTime)/1000, top(self, 25), top(total, 40))
}
