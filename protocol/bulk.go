package protocol

// Bulky is implemented by the arguments of the kinds that can carry a large text (a file's
// contents: a matrix, a list of values, samples). The page sends that text beside the
// request's JSON, as bytes, not inside it, and the worker puts it back (BulkSetter) after
// decoding the rest, so that neither side runs the JSON coder over megabytes: for a 58 MB CSV
// that was about 4 s of encoding and decoding in the page's WebAssembly, and four copies of
// the text in memory.
type Bulky interface {
	// BulkText returns the large text ("" when there is none).
	BulkText() string
	// WithoutBulk returns a copy of the arguments with the large text left out.
	WithoutBulk() any
}

// BulkSetter is implemented by a pointer to arguments that are Bulky.
type BulkSetter interface {
	// SetBulk puts the large text back into the arguments.
	SetBulk(text string)
}

// Each kind that reads a file says which of its fields is the file's text.

func (a SpectrumArgs) BulkText() string  { return a.Text }
func (a SpectrumArgs) WithoutBulk() any  { a.Text = ""; return a }
func (a *SpectrumArgs) SetBulk(t string) { a.Text = t }

func (a FitArgs) BulkText() string  { return a.Text }
func (a FitArgs) WithoutBulk() any  { a.Text = ""; return a }
func (a *FitArgs) SetBulk(t string) { a.Text = t }

func (a CheckArgs) BulkText() string  { return a.Matrix }
func (a CheckArgs) WithoutBulk() any  { a.Matrix = ""; return a }
func (a *CheckArgs) SetBulk(t string) { a.Matrix = t }
