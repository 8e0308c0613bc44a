package ui

import (
	"errors"
	"strings"

	"github.com/vugu/vugu"

	"hdrisk/engine/plot"
)

// pngScale is the pixel density of a figure saved as PNG: two device pixels per CSS pixel,
// 192 dots per inch for a figure measured in points, sharp on a dense screen and in print.
const pngScale = 2

// errNoBrowser is the reason a file cannot be saved without the browser.
var errNoBrowser = errors.New("saving a file needs the browser")

// imageURL returns a URL under which an <img> shows data: a short blob: URL held by the
// browser (release it with dropImage when the image is replaced), so that no figure ever
// passes through the page's renderer as a long attribute (its 16 KB buffer stops the page on
// a longer one). Special cases are: without a browser (native tests) a data: URL is
// returned when it stays under maxFigureURL and an error otherwise.
func imageURL(br Browser, mime string, data []byte) (string, error) {
	if br != nil {
		return br.ObjectURL(mime, data)
	}
	u := plot.DataURL(mime, data)
	if len(u) > maxFigureURL {
		return "", errors.New(figureTooLong)
	}
	return u, nil
}

// dropImage releases a URL made by imageURL. Special cases are: "" and data: URLs need no
// release and are ignored.
func dropImage(br Browser, url string) {
	if br != nil && strings.HasPrefix(url, "blob:") {
		br.RevokeObjectURL(url)
	}
}

// savePNG draws svg as a PNG in the browser and offers it as the file name; problems go to
// report. done (may be nil) is called once the file is offered or refused.
func savePNG(br Browser, name string, svg []byte, report func(error), done func()) {
	if br == nil {
		report(errNoBrowser)
		if done != nil {
			done()
		}
		return
	}
	br.SVGToPNG(svg, pngScale, func(png []byte, err error) {
		if err == nil {
			err = br.Download(name, "image/png", png)
		}
		if err != nil {
			report(err)
		}
		if done != nil {
			done()
		}
	})
}

// The views release their figures' images when the page drops them (vugu calls Destroy on a
// component it no longer renders), so that a view shown and dropped again and again holds
// no images it will never show.

// Destroy implements vugu's destroyer.
func (c *CurveView) Destroy(vugu.DestroyCtx) { c.box.clear() }

// Destroy implements vugu's destroyer.
func (c *Mapview) Destroy(vugu.DestroyCtx) { c.box.clear() }

// Destroy implements vugu's destroyer.
func (c *CheckView) Destroy(vugu.DestroyCtx) {
	dropImage(c.Browser, c.figURL)
	c.figURL = ""
}

// Destroy implements vugu's destroyer.
func (c *DataView) Destroy(vugu.DestroyCtx) {
	for _, p := range []*dataPart{&c.design, &c.signal} {
		dropImage(c.Browser, p.figURL)
		p.figURL = ""
	}
}
