package ui

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/vugu/vugu"

	"hdrisk/engine/data"
	"hdrisk/engine/plot"
	"hdrisk/engine/scenario"
	"hdrisk/protocol"
)

// Caps on what the page reads, checked against the file's size before it is read whole
// (Browser.ReadFile's limit) and passed to the reader for pasted text. A 4000 x 4000
// matrix (the engine's cap) written at full precision is about 300 MB, more than a page
// should hold; 128 MiB takes a 2000 x 4000 matrix at 15 significant digits.
const (
	MaxMatrixBytes = 128 << 20
	MaxListBytes   = 32 << 20
)

// The page's renderer (vugu's domrender) passes every text through a 16384-byte buffer and
// stops the page when one does not fit, so a list put into the editor's box must stay well
// below that; figures go through blob: URLs (imageURL), and through data: URLs only in
// native tests without a browser, below maxFigureURL.
const (
	maxListChars  = 12000
	maxFigureURL  = 14000
	signalBins    = 50
	figureTooLong = "the figure is too detailed to show on the page"
)

// Sources a design can come from, with the page's labels.
var DataSources = []Kind{
	{Name: protocol.SourceMatrix, Label: "A measurement matrix", Help: "CSV, TSV, numbers separated by spaces, or Matrix Market"},
	{Name: protocol.SourceSingular, Label: "A list of its singular values"},
	{Name: protocol.SourceEigenvalues, Label: "A list of the eigenvalues of FᵀF"},
}

// FitMethods are the ways samples become a signal law, with the page's labels.
var FitMethods = []Kind{
	{Name: protocol.FitNone, Label: "The samples as they are", Help: "the empirical law: each sample an atom of equal weight"},
	{Name: protocol.FitBernoulli, Label: "Fit a sparse Gaussian law", Help: "zeros and a Gaussian, the share of zeros fitted"},
	{Name: protocol.FitMixture, Label: "Fit a mixture of Gaussians"},
}

// dataPart is the state of one half of the view: the design or the signal.
type dataPart struct {
	run, problem string
	stage        string
	fileName     string
	text         string // pasted text, kept across errors
	started      time.Time
	done, total  int // progress of the job, as its worker reports it
	elapsed      time.Duration
	cancel       func()
	figURL       string
	figErr       string
	figure       *plot.Figure
	applied      string // what "use" did, in words
}

// reset clears the part's outcome, releasing its figure's image held by br.
func (p *dataPart) reset(br Browser) {
	dropImage(br, p.figURL)
	p.problem, p.figURL, p.figErr, p.figure, p.applied, p.stage = "", "", "", nil, "", ""
}

func (c *DataView) start() {
	if c.design.run == "" {
		c.design.run, c.signal.run = RunIdle, RunIdle
		c.Source, c.Method, c.kText, c.alphaText = protocol.SourceMatrix, protocol.FitNone, "2", "1"
	}
}

// Init implements vugu's initializer.
func (c *DataView) Init(vugu.InitCtx) { c.start() }

// InputWriter puts text in a text box of the page directly: the renderer passes what it
// sets through a 16 KB buffer, which a pasted matrix does not fit.
type InputWriter interface {
	SetInput(id, text string)
}

// Rendered implements vugu's rendered hook. The paste boxes are built afresh, empty, each
// time the tab is selected; the text pasted in them is kept in the view, and goes back into
// them here, so that a tab switch loses nothing and the box shows what Read would read.
func (c *DataView) Rendered(vugu.RenderedCtx) {
	if !c.Active {
		c.refilled = false
		return
	}
	if c.refilled {
		return
	}
	c.refilled = true
	w, ok := c.Browser.(InputWriter)
	if !ok {
		return
	}
	for _, b := range []struct {
		id   string
		text string
	}{{"data-design-text", c.design.text}, {"data-signal-text", c.signal.text}} {
		if b.text != "" {
			w.SetInput(b.id, b.text)
		}
	}
}

func (c *DataView) now() time.Time {
	if c.Clock != nil {
		return c.Clock()
	}
	return time.Now()
}

// Run is the view's data-run: running while either part runs, else the design's state
// unless only the signal part was used.
func (c *DataView) Run() string {
	c.start()
	switch {
	case c.design.run == RunRunning || c.signal.run == RunRunning:
		return RunRunning
	case c.design.run == RunIdle:
		return c.signal.run
	}
	return c.design.run
}

// DesignRun and SignalRun are the data-run hooks of the two parts.
func (c *DataView) DesignRun() string { c.start(); return c.design.run }
func (c *DataView) SignalRun() string { c.start(); return c.signal.run }

// SetSetting stores one input: "source", "method", "k", "alpha", "design-text" or
// "signal-text". Special cases are: an unknown name is an error.
func (c *DataView) SetSetting(name, text string) error {
	c.start()
	switch name {
	case "source":
		c.Source = text
	case "method":
		c.Method = text
	case "k":
		c.kText = text
	case "alpha":
		c.alphaText = text
	case "design-text":
		c.design.text = text
	case "signal-text":
		c.signal.text = text
	default:
		return fmt.Errorf("no setting %q", name)
	}
	return nil
}

// Design input ids, for the file inputs the browser reads.
const (
	DesignFileID = "data-design-file"
	SignalFileID = "data-signal-file"
)

func (c *DataView) limit(part string) int64 {
	if part == "design" && c.Source == protocol.SourceMatrix {
		return MaxMatrixBytes
	}
	return MaxListBytes
}

// ReadFile reads the file chosen for part ("design" or "signal") and computes from it.
func (c *DataView) ReadFile(part string) {
	c.start()
	p := c.part(part)
	if p.cancel != nil {
		return
	}
	if c.Browser == nil {
		p.run, p.problem = RunError, "reading a file needs the browser; paste the numbers instead"
		return
	}
	id := DesignFileID
	if part == "signal" {
		id = SignalFileID
	}
	p.reset(c.Browser)
	p.run, p.stage, p.started = RunRunning, "Reading the file", c.now()
	limit := c.limit(part)
	reading := true
	p.cancel = func() { reading = false }
	c.Browser.ReadFile(id, limit, func(name string, content []byte, err error) {
		if !reading {
			return
		}
		p.cancel = nil
		p.fileName = name
		if err != nil {
			p.run, p.problem = RunError, fmt.Sprintf("%v (the page reads files of at most %d MB)", err, limit>>20)
			return
		}
		// Refused by its first bytes here, a binary file never goes to a worker: its text
		// would cost seconds to copy and minutes to read.
		if err := data.Sniff(content); err != nil {
			p.run, p.problem = RunError, name+": "+err.Error()
			return
		}
		c.compute(part, string(content))
	})
}

// ReadText computes from the pasted text of part.
func (c *DataView) ReadText(part string) {
	c.start()
	p := c.part(part)
	if p.cancel != nil {
		return
	}
	p.reset(c.Browser)
	if strings.TrimSpace(p.text) == "" {
		p.run, p.problem = RunError, "paste some numbers first"
		return
	}
	p.fileName = ""
	p.started = c.now()
	c.compute(part, p.text)
}

func (c *DataView) part(name string) *dataPart {
	if name == "signal" {
		return &c.signal
	}
	return &c.design
}

func (c *DataView) compute(part, text string) {
	p := c.part(part)
	if c.Jobs == nil {
		p.run, p.problem = RunError, "the compute workers are still starting; try again in a moment"
		return
	}
	p.run, p.done, p.total = RunRunning, 0, 0
	var args any
	if part == "design" {
		a := protocol.SpectrumArgs{Source: c.Source, Text: text, MaxBytes: c.limit(part)}
		if c.Source != protocol.SourceMatrix {
			alpha, err := c.listAlpha()
			if err != nil {
				p.run, p.problem = RunError, err.Error()
				return
			}
			a.Rows, a.Cols = listShape(text, alpha)
		}
		args = a
		p.stage = "Reading the numbers"
	} else {
		a := protocol.FitArgs{Text: text, Method: c.Method, MaxBytes: c.limit(part), Bins: signalBins}
		if c.Method == protocol.FitMixture {
			k, err := wholeNumber("k", c.kText, 1, protocol.MaxMixture)
			if err != nil {
				p.run, p.problem = RunError, err.Error()
				return
			}
			a.K = k
		}
		args = a
		p.stage = "Reading the samples"
	}
	kind := map[string]string{"design": "spectrum", "signal": "fit"}[part]
	finished := false // a fake or a failing pool may answer before Start returns
	cancel := c.Jobs.Start(kind, args, func(done, total int) {
		if part == "design" {
			p.done, p.total = done, total
			p.stage = spectrumStages[protocol.SpectrumStep(done)]
		} else if done >= 1 {
			p.stage = "Fitting"
		}
	}, func(res []byte, err error) {
		finished, p.cancel = true, nil
		p.elapsed = c.now().Sub(p.started)
		if err == nil {
			if part == "design" {
				var r protocol.SpectrumResult
				if err = json.Unmarshal(res, &r); err == nil {
					c.spectrum, c.matrixText = &r, ""
					if r.Source == protocol.SourceMatrix {
						c.matrixText = text
					}
				}
			} else {
				var r protocol.FitResult
				if err = json.Unmarshal(res, &r); err == nil {
					c.fit = &r
				}
			}
		}
		if err != nil {
			what := "the pasted text"
			if p.fileName != "" {
				what = p.fileName
			}
			p.run, p.problem = RunError, what+": "+err.Error()
			return
		}
		p.run = RunDone
		c.drawPart(part)
	})
	if !finished {
		p.cancel = cancel
	}
}

// spectrumStages are the page's words for the steps of the "spectrum" kind.
var spectrumStages = map[string]string{
	protocol.StepReading:     "Reading the numbers",
	protocol.StepGram:        "Forming the Gram matrix (the matrix times its transpose)",
	protocol.StepReduction:   "Reducing the Gram matrix to tridiagonal form",
	protocol.StepEigenvalues: "Computing its eigenvalues",
	protocol.StepSummary:     "Summarizing",
}

// listAlpha reads the m/n a list of singular values belongs to.
func (c *DataView) listAlpha() (float64, error) {
	a, err := strconv.ParseFloat(strings.TrimSpace(c.alphaText), 64)
	if err != nil || !(a > 0) || a > scenario.MaxAlpha {
		return 0, fmt.Errorf("m/n: must be a number in (0, %d], not %q", scenario.MaxAlpha, strings.TrimSpace(c.alphaText))
	}
	return a, nil
}

// listShape returns a shape m x n with min(m, n) = k values of the list in text and m/n
// as near alpha as whole numbers allow; the summary's rank tolerance and the stated
// shape use it, the design uses alpha itself. Counting the numbers here is rough (the
// reader counts them exactly); 0, 0 lets the job take a square shape.
func listShape(text string, alpha float64) (int, int) {
	k := len(strings.FieldsFunc(text, func(r rune) bool { return r == ',' || r == ';' || r == ' ' || r == '\t' || r == '\n' || r == '\r' }))
	if alpha == 1 || k == 0 || strings.ContainsAny(text, "#abcdfghijklmnopqrstuvwxyz") {
		return 0, 0
	}
	if alpha < 1 {
		return k, max(k, int(math.Round(float64(k)/alpha)))
	}
	return max(k, int(math.Round(float64(k)*alpha))), k
}

// Cancel stops the computation of part.
func (c *DataView) Cancel(part string) {
	p := c.part(part)
	if p.cancel == nil {
		return
	}
	p.cancel()
	p.cancel = nil
	p.run, p.stage = RunCancelled, ""
}

// Busy reports whether part is computing.
func (c *DataView) Busy(part string) bool { return c.part(part).cancel != nil }

// Stage is the progress line of part.
func (c *DataView) Stage(part string) string {
	p := c.part(part)
	if p.cancel == nil {
		return ""
	}
	return p.stage + "…"
}

// Progress returns the done and total of part's job; total is 0 before its first report.
func (c *DataView) Progress(part string) (done, total int) {
	p := c.part(part)
	return p.done, p.total
}

// ProgressPermille is part's progress in thousandths, for the progress bar.
func (c *DataView) ProgressPermille(part string) int {
	p := c.part(part)
	if p.total <= 0 {
		return 0
	}
	return 1000 * p.done / p.total
}

// Problem is part's message; "" when there is none.
func (c *DataView) Problem(part string) string { return c.part(part).problem }

// Applied says what the last "use" did.
func (c *DataView) Applied(part string) string { return c.part(part).applied }

// FigureURL is the URL of part's figure for <img src> (see imageURL); "" when none.
func (c *DataView) FigureURL(part string) string { return c.part(part).figURL }

// stepSeries turns a histogram into a closed step outline.
func stepSeries(name string, edges []float64, heights []float64) plot.Series {
	s := plot.Series{Name: name}
	if len(edges) < 2 {
		return s
	}
	s.X, s.Y = append(s.X, edges[0]), append(s.Y, 0)
	for k, h := range heights {
		s.X, s.Y = append(s.X, edges[k], edges[k+1]), append(s.Y, h, h)
	}
	s.X, s.Y = append(s.X, edges[len(edges)-1]), append(s.Y, 0)
	return s
}

func (c *DataView) drawPart(part string) {
	p := c.part(part)
	var spec plot.Line
	switch {
	case part == "design" && c.spectrum != nil:
		h := c.spectrum.Histogram
		counts := make([]float64, len(h.Counts))
		for i, n := range h.Counts {
			counts[i] = float64(n)
		}
		spec = plot.Line{Title: "Singular values", XLabel: "singular value", YLabel: "count",
			Series: []plot.Series{stepSeries("", h.Edges, counts)}}
	case part == "signal" && c.fit != nil:
		h := c.fit.Histogram
		spec = plot.Line{Title: "Signal samples", XLabel: "value", YLabel: "density",
			Series: []plot.Series{stepSeries("samples (histogram)", h.Edges, h.Density)}}
		if len(c.fit.Curve) > 0 {
			var x, y []float64
			for _, d := range c.fit.Curve {
				x, y = append(x, float64(d.X)), append(y, float64(d.Density))
			}
			name := "fitted density"
			if c.fit.Method == protocol.FitBernoulli {
				name = fmt.Sprintf("fitted Gaussian part (plus %s of the mass at 0)", fmtNum(float64(c.fit.SpikeMass)))
			}
			spec.Series = append(spec.Series, plot.Series{Name: name, X: x, Y: y})
		}
	default:
		return
	}
	dropImage(c.Browser, p.figURL)
	p.figure, p.figURL = nil, ""
	f, err := spec.Build()
	var svg []byte
	if err == nil {
		svg, err = f.SVG()
	}
	if err != nil {
		p.figErr = "the figure could not be drawn: " + err.Error()
		return
	}
	p.figure = f
	if p.figURL, err = imageURL(c.Browser, "image/svg+xml", svg); err != nil {
		p.figErr = "the figure cannot be shown: " + err.Error()
	}
}

// shortList fits values into the editor's box (see maxListChars) and says what it did to
// them; "" when nothing.
func shortList(values []float64, what string) ([]float64, string) {
	out, digits, thinned := protocol.ShortList(values, maxListChars)
	switch {
	case thinned:
		return out, fmt.Sprintf(" The %d %s were thinned to %d evenly spaced quantiles at %d significant digits, the most the editor's box can show.", len(values), what, len(out), digits)
	case digits > 0:
		return out, fmt.Sprintf(" The values were rounded to %d significant digits, the most the editor's box can show.", digits)
	}
	return out, ""
}

// DesignFacts are the summary lines of the spectrum, as hook name, data-value and text.
func (c *DataView) DesignFacts() [][3]string {
	r := c.spectrum
	if r == nil || c.design.run != RunDone {
		return nil
	}
	cond := "infinite (the smallest singular value is 0)"
	if v := float64(r.Condition); v > 0 {
		cond = fmtNum(v)
	}
	out := [][3]string{
		{"data_rows", strconv.Itoa(r.Rows), fmt.Sprintf("Rows m = %d, columns n = %d", r.Rows, r.Cols)},
		{"data_alpha", fullNum(float64(r.Alpha)), "Sampling ratio m/n = " + fmtNum(float64(r.Alpha))},
		{"data_sv_count", strconv.Itoa(len(r.SingularValues)), fmt.Sprintf("%d singular values from %s to %s", len(r.SingularValues), fmtNum(float64(r.Min)), fmtNum(float64(r.Max)))},
		{"data_condition", fullNum(float64(r.Condition)), "Condition number " + cond},
		{"data_rank", strconv.Itoa(r.Rank), fmt.Sprintf("Rank %d (values above %s)", r.Rank, fmtNum(float64(r.Tolerance)))},
		{"data_seconds", fullNum(c.design.elapsed.Seconds()), fmt.Sprintf("Took %.2f s in all", c.design.elapsed.Seconds())},
	}
	if r.Source == protocol.SourceMatrix {
		out = append(out, [3]string{"data_svd_seconds", fullNum(float64(r.SVDSeconds)),
			fmt.Sprintf("Reading %.2f s, singular values %.2f s", float64(r.ReadSeconds), float64(r.SVDSeconds))})
	}
	return out
}

// SignalFacts are the summary lines of the samples and the fit.
func (c *DataView) SignalFacts() [][3]string {
	r := c.fit
	if r == nil || c.signal.run != RunDone {
		return nil
	}
	out := [][3]string{
		{"data_samples", strconv.Itoa(r.Count), fmt.Sprintf("%d samples, %d of them exactly 0", r.Count, r.Zeros)},
		{"data_mean", fullNum(float64(r.Mean)), fmt.Sprintf("Mean %s, variance %s, from %s to %s", fmtNum(float64(r.Mean)), fmtNum(float64(r.Variance)), fmtNum(float64(r.Min)), fmtNum(float64(r.Max)))},
	}
	switch r.Method {
	case protocol.FitNone:
		what := "the samples themselves"
		if r.Quantiles {
			what = fmt.Sprintf("%d evenly spaced quantiles of the %d samples (the page's longest list)", len(r.Values), r.Count)
		}
		out = append(out, [3]string{"data_values", strconv.Itoa(len(r.Values)), "The empirical law uses " + what})
	case protocol.FitBernoulli:
		out = append(out, [3]string{"data_density", fullNum(float64(r.Density)),
			fmt.Sprintf("Fitted: nonzero with probability %s, then Gaussian with variance %s", fmtNum(float64(r.Density)), fmtNum(float64(r.SlabVar)))})
	case protocol.FitMixture:
		var parts []string
		for i := range r.Weights {
			parts = append(parts, fmt.Sprintf("%s × N(%s, %s)", fmtNum(r.Weights[i]), fmtNum(r.Means[i]), fmtNum(r.Variances[i])))
		}
		conv := ""
		if !r.Converged {
			conv = " (EM stopped at its iteration limit)"
		}
		out = append(out, [3]string{"data_components", strconv.Itoa(len(r.Weights)), "Fitted: " + strings.Join(parts, " + ") + conv})
	}
	return out
}

// UseDesign makes the design of the scenario the empirical-sv law of the singular values
// read, with alpha = rows/cols for a matrix and the stated m/n for a list. The design's
// scale stays as the editor has it. Special cases are: a scenario the engine refuses with
// the new design is reported and the open scenario is kept.
func (c *DataView) UseDesign() {
	r := c.spectrum
	if r == nil || c.design.run != RunDone {
		return
	}
	alpha := float64(r.Alpha)
	if r.Source != protocol.SourceMatrix {
		a, err := c.listAlpha()
		if err != nil {
			c.design.problem = err.Error()
			return
		}
		alpha = a
	}
	values, note := shortList(r.SingularValues, "singular values")
	old := c.Model.Matrix
	c.Model.Matrix = nil
	if r.Source == protocol.SourceMatrix && c.matrixText != "" {
		c.Model.Matrix = &UserMatrix{Name: c.design.fileName, Text: c.matrixText, Rows: r.Rows, Cols: r.Cols,
			MaxBytes: MaxMatrixBytes, Locked: true}
	}
	err := c.apply(func(s *scenario.Scenario) {
		s.Design = scenario.Design{Shape: "empirical-sv", Alpha: alpha, Scale: s.Design.Scale,
			Lists: map[string][]float64{"values": values}}
	})
	if err != nil {
		c.Model.Matrix = old
		c.design.problem = "cannot use these values as the design: " + err.Error()
		return
	}
	c.design.applied = fmt.Sprintf("The design is now these %d singular values with m/n = %s.", len(r.SingularValues), fmtNum(alpha)) + note
	if c.Model.Matrix != nil {
		c.design.applied += fmt.Sprintf(" m/n is locked to the matrix's shape, %d × %d; the check view can now run trials with the matrix itself.", r.Rows, r.Cols)
	}
}

// Locked is the user's matrix whose shape m/n follows; nil when none.
func (c *DataView) Locked() *UserMatrix { return c.Model.MatrixDesign() }

// UnlockAlpha frees m/n from the matrix's shape, saying what that means.
func (c *DataView) UnlockAlpha() {
	u := c.Model.MatrixDesign()
	if u == nil {
		return
	}
	u.Locked = false
	c.design.applied = "m/n is free: a design with these singular values at another sampling ratio is no longer your matrix, so the check with the matrix itself is off. Use the matrix as the design again to lock m/n to its shape."
	if c.Changed != nil {
		c.Changed()
	}
}

// UseSignal makes the signal law of the scenario the empirical law of the samples or the
// fitted law.
func (c *DataView) UseSignal() {
	r := c.fit
	if r == nil || c.signal.run != RunDone {
		return
	}
	var sig scenario.Signal
	note := ""
	switch r.Method {
	case protocol.FitNone:
		var values []float64
		values, note = shortList(r.Values, "values")
		sig = scenario.Signal{Law: "empirical", Lists: map[string][]float64{"values": values}}
	case protocol.FitBernoulli:
		sig = scenario.Signal{Law: "bernoulli-gauss", Params: map[string]float64{"density": float64(r.Density), "variance": float64(r.SlabVar)}}
	case protocol.FitMixture:
		sig = scenario.Signal{Law: "gauss-mixture", Lists: map[string][]float64{"weights": r.Weights, "means": r.Means, "variances": r.Variances}}
	}
	if err := c.apply(func(s *scenario.Scenario) { s.Signal = sig }); err != nil {
		c.signal.problem = "cannot use this as the signal: " + err.Error()
		return
	}
	c.signal.applied = "The signal is now " + map[string]string{protocol.FitNone: "the empirical law of the samples.",
		protocol.FitBernoulli: "the fitted sparse Gaussian law.", protocol.FitMixture: "the fitted Gaussian mixture."}[r.Method] + note
}

// apply changes the open scenario through edit, checks the result with the engine and
// loads it into the editor; on any error the open scenario is kept as it was.
func (c *DataView) apply(edit func(*scenario.Scenario)) error {
	ch := c.Model.Check()
	if ch.Err != nil {
		return fmt.Errorf("the open scenario has a problem to fix first: %w", ch.Err)
	}
	s := ch.Scenario
	edit(&s)
	if err := s.Validate(); err != nil {
		return err
	}
	if err := c.Model.Load(s); err != nil {
		return err
	}
	if c.Changed != nil {
		c.Changed()
	}
	return nil
}

func (c *DataView) typed(e vugu.DOMEvent, name string) {
	_ = c.SetSetting(name, e.PropString("target", "value"))
}
