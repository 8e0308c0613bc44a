package ui

import "hdrisk/protocol"

// Jobs runs heavy work (sweeps, maps, finite-size checks, singular values of a user's matrix)
// on the page's compute workers. kind names a kind of the protocol (package protocol); args
// is encoded to JSON as its arguments and the result comes back as protocol.Marshal wrote it.
// Components start jobs through start, which checks the types of both. progress (may be nil) and done are called with the page's render lock
// held, so they may change component state directly; done is called exactly once unless the
// returned cancel is called first, after which neither is called again.
type Jobs interface {
	Start(kind string, args any, progress func(done, total int), done func(result []byte, err error)) (cancel func())
}

// Browser is what the interface needs from the browser beyond the DOM that vugu renders.
// wasm/page implements it over safejs; tests use a fake. Callbacks are called with the
// render lock held.
type Browser interface {
	// Address is the page's address without its fragment; Fragment is the fragment without
	// its '#'.
	Address() string
	Fragment() string
	// SetFragment puts frag in the address bar: as a new history entry when push is true,
	// in place of the current one otherwise.
	SetFragment(frag string, push bool)
	// OnFragment registers f to be called with the new fragment when the user moves through
	// the history (back and forward) or edits the fragment by hand.
	OnFragment(f func(frag string))
	// Copy puts text on the clipboard.
	Copy(text string, done func(error))
	// Load and Store read and write the browser's local storage for this page.
	Load(key string) (string, bool)
	Store(key, value string) error
	// Download offers data to the user as a file.
	Download(name, mime string, data []byte) error
	// ReadFile reads the first file chosen in the <input type="file"> with the given id,
	// reading at most limit bytes; a longer file is refused with an error that says so.
	ReadFile(inputID string, limit int64, done func(name string, data []byte, err error))
	// ObjectURL holds data (of the given MIME type) in the browser and returns a short
	// blob: URL for it, valid until RevokeObjectURL. Every figure is shown this way: the
	// page's renderer passes each attribute through a 16 KB buffer and stops the page on a
	// longer one, which a figure's data: URL often is.
	ObjectURL(mime string, data []byte) (string, error)
	// RevokeObjectURL releases a URL made by ObjectURL. Special cases are: any other text
	// is ignored.
	RevokeObjectURL(url string)
	// SVGToPNG draws an SVG image on a white background at scale device pixels per CSS
	// pixel (an SVG 480pt wide is 640 CSS pixels: scale 2 gives 1280 pixels) and encodes it
	// as PNG. Special cases are: scale outside (0, 8] and an image the browser cannot draw
	// are errors.
	SVGToPNG(svg []byte, scale float64, done func(png []byte, err error))
}

// start runs a job of the protocol's kind k and hands done its result, decoded as k's result
// type. The callbacks are those of Jobs.Start.
func start[A, R any](jobs Jobs, k protocol.Kind[A, R], args A, progress func(done, total int), done func(R, error)) (cancel func()) {
	return jobs.Start(k.Name, args, progress, func(res []byte, err error) {
		var r R
		if err == nil {
			r, err = k.DecodeResult(res)
		}
		done(r, err)
	})
}
