package ui

import (
	"bytes"
	"errors"
	"fmt"
	"image"
	"image/png"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// fakeImages stands in for the browser's object URLs and its drawing of SVG as PNG in
// native tests. It keeps every held image under its blob: URL, so that tests can read a
// figure back and count the URLs not yet released. Its PNG is a white image of the size
// the browser would draw (the SVG's width and height in points, 4/3 CSS pixels each, times
// the scale); the drawing itself is the browser's and is checked in browsertest.
type fakeImages struct {
	held map[string][]byte
	n    int
}

func (f *fakeImages) ObjectURL(_ string, data []byte) (string, error) {
	if f.held == nil {
		f.held = map[string][]byte{}
	}
	f.n++
	u := fmt.Sprintf("blob:file:///test/%d", f.n)
	f.held[u] = data
	return u, nil
}

func (f *fakeImages) RevokeObjectURL(u string) { delete(f.held, u) }

var svgSize = regexp.MustCompile(`<svg width="([0-9.]+)pt" height="([0-9.]+)pt"`)

func (f *fakeImages) SVGToPNG(svg []byte, scale float64, done func([]byte, error)) {
	m := svgSize.FindSubmatch(svg)
	if m == nil || !(scale > 0 && scale <= 8) {
		done(nil, errors.New("not an SVG image of known size, or a bad scale"))
		return
	}
	w, _ := strconv.ParseFloat(string(m[1]), 64)
	h, _ := strconv.ParseFloat(string(m[2]), 64)
	img := image.NewGray(image.Rect(0, 0, int(math.Round(w*4/3*scale)), int(math.Round(h*4/3*scale))))
	for i := range img.Pix {
		img.Pix[i] = 0xff
	}
	var b bytes.Buffer
	err := png.Encode(&b, img)
	done(b.Bytes(), err)
}

// shown returns the image held under url, failing the test when it is not a live SVG.
func (f *fakeImages) shown(t *testing.T, what, url string) []byte {
	t.Helper()
	data, ok := f.held[url]
	if !ok || !strings.HasPrefix(url, "blob:") {
		t.Fatalf("%s: URL %.40q is not a live blob: URL", what, url)
	}
	if !bytes.Contains(data, []byte("<svg")) {
		t.Fatalf("%s: not an SVG document", what)
	}
	return data
}

// pngSize returns the size of a PNG image.
func pngSize(t *testing.T, data []byte) (w, h int) {
	t.Helper()
	c, err := png.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("not a PNG: %v", err)
	}
	return c.Width, c.Height
}

// Without a browser (native use) a figure is a data: URL as long as it stays short enough
// for the page's renderer, and is refused beyond; with one it is a blob: URL, released by
// dropImage.
func TestImageURL(t *testing.T) {
	small := []byte("<svg/>")
	if u, err := imageURL(nil, "image/svg+xml", small); err != nil || !strings.HasPrefix(u, "data:image/svg+xml;base64,") {
		t.Errorf("small image without a browser: %q, %v", u, err)
	}
	if _, err := imageURL(nil, "image/svg+xml", bytes.Repeat([]byte("x"), maxFigureURL)); err == nil {
		t.Error("a data: URL longer than the renderer's buffer should be refused")
	}
	br := &keepBrowser{}
	u, err := imageURL(br, "image/svg+xml", bytes.Repeat([]byte("x"), 1<<20))
	if err != nil || len(u) > 100 || len(br.held) != 1 {
		t.Fatalf("a large image with a browser: %q, %v", u, err)
	}
	dropImage(br, "data:image/svg+xml;base64,AAAA")
	if len(br.held) != 1 {
		t.Error("a data: URL must not release anything")
	}
	dropImage(br, u)
	if len(br.held) != 0 {
		t.Error("the blob: URL was not released")
	}
}

// The editor's law plots are shown through blob: URLs, and a plot replaced after an edit
// releases its URL: two images live at any time.
func TestLawPlotsUseBlobURLs(t *testing.T) {
	br := &keepBrowser{}
	c := &Root{Eval: &recorder{}, Browser: br}
	c.Init(nil)
	br.shown(t, "design plot", c.designPlot.URL)
	br.shown(t, "signal plot", c.signalPlot.URL)
	first := c.designPlot.URL
	for i, alpha := range []string{"0.5", "0.6", "0.7"} {
		_ = c.Model.SetText("in-design-alpha", alpha)
		c.changed()
		if c.designPlot.URL == first || len(br.held) != 2 {
			t.Fatalf("edit %d: design plot %q, %d images held", i, c.designPlot.URL, len(br.held))
		}
	}
	if _, ok := br.held[first]; ok {
		t.Error("the first design plot was never released")
	}
}
