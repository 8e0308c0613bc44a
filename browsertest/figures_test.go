package browsertest

import (
	"fmt"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// imageShown waits until the <img> matched by sel shows a loaded image from a blob: URL
// (every figure of the page goes through one, never through a long data: URL) and returns
// its natural width in CSS pixels.
func (b *browser) imageShown(t *testing.T, sel string) int {
	t.Helper()
	var w int
	err := chromedp.Run(b.ctx, chromedp.Poll(fmt.Sprintf(
		`(e=>e&&e.complete&&e.naturalWidth>0&&e.getAttribute("src").startsWith("blob:")?e.naturalWidth:null)(document.querySelector(%q))`, sel),
		&w, chromedp.WithPollingInterval(20*time.Millisecond), chromedp.WithPollingTimeout(10*time.Second)))
	if err != nil {
		t.Fatalf("%s shows no loaded blob: image: %v (src starts %q)", sel, err,
			b.cdJS(t, fmt.Sprintf(`(e=>e?String(e.getAttribute("src")).slice(0,30):"no element")(document.querySelector(%q))`, sel)))
	}
	return w
}
