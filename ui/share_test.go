package ui

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"hdrisk/engine"
	"hdrisk/engine/scenario"
)

// fakeBrowser records what the share panel asks of the browser.
type fakeBrowser struct {
	fakeImages
	addr      string
	entries   []string // history entries (fragments); cur is the current one
	cur       int
	pushes    int
	store     map[string]string
	storeErr  error
	copied    []string
	copyErr   error
	downloads map[string][]byte
	file      struct {
		name string
		data []byte
		err  error
	}
	input  string // text of the paste box
	onFrag func(string)
}

func newFake(frag string) *fakeBrowser {
	return &fakeBrowser{addr: "file:///home/user/hdrisk.html", entries: []string{frag},
		store: map[string]string{}, downloads: map[string][]byte{}}
}

func (b *fakeBrowser) Address() string  { return b.addr }
func (b *fakeBrowser) Fragment() string { return b.entries[b.cur] }
func (b *fakeBrowser) SetFragment(frag string, push bool) {
	if push {
		b.entries = append(b.entries[:b.cur+1], frag)
		b.cur++
		b.pushes++
		return
	}
	b.entries[b.cur] = frag
}
func (b *fakeBrowser) OnFragment(f func(string)) { b.onFrag = f }
func (b *fakeBrowser) Copy(text string, done func(error)) {
	if b.copyErr == nil {
		b.copied = append(b.copied, text)
	}
	done(b.copyErr)
}
func (b *fakeBrowser) Load(key string) (string, bool) { v, ok := b.store[key]; return v, ok }
func (b *fakeBrowser) Store(key, value string) error {
	if b.storeErr != nil {
		return b.storeErr
	}
	b.store[key] = value
	return nil
}
func (b *fakeBrowser) Download(name, mime string, data []byte) error {
	b.downloads[name] = data
	return nil
}
func (b *fakeBrowser) ReadFile(id string, limit int64, done func(string, []byte, error)) {
	if id != FileInputID {
		done("", nil, errors.New("no such input"))
		return
	}
	if int64(len(b.file.data)) > limit {
		done(b.file.name, nil, errors.New("too large"))
		return
	}
	done(b.file.name, b.file.data, b.file.err)
}

func (b *fakeBrowser) InputText(id string, limit int) (string, int, error) {
	if id != PasteInputID {
		return "", 0, errors.New("no such input")
	}
	if n := utf8.RuneCountInString(b.input); n > limit {
		return "", n, nil
	}
	return b.input, utf8.RuneCountInString(b.input), nil
}

func (b *fakeBrowser) ClearInput(id string) {
	if id == PasteInputID {
		b.input = ""
	}
}

// back moves one entry back, as the browser's Back button does, and reports the fragment.
func (b *fakeBrowser) back() {
	b.cur--
	b.onFrag(b.entries[b.cur])
}

type clock struct{ t time.Time }

func (c *clock) now() time.Time { return c.t }

// newShare starts a share panel over a fresh model and the fake browser.
func newShare(t *testing.T, b *fakeBrowser) (*Share, *int, *clock) {
	t.Helper()
	changes := 0
	clk := &clock{t: time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)}
	c := &Share{Model: NewModel(), Browser: b, Changed: func() { changes++ }, Now: clk.now}
	c.Start()
	return c, &changes, clk
}

func example(t *testing.T, name string) scenario.Scenario {
	t.Helper()
	ex, err := Examples()
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ex {
		if e.Name == name {
			return e.Scenario
		}
	}
	t.Fatalf("no example %s", name)
	return scenario.Scenario{}
}

func modelJSON(t *testing.T, m *Model) string {
	t.Helper()
	data, err := m.JSON()
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

func link(t *testing.T, s scenario.Scenario) string {
	t.Helper()
	code, err := scenario.EncodeLink(s)
	if err != nil {
		t.Fatal(err)
	}
	return code
}

func deflateCode(t *testing.T, data []byte) string {
	t.Helper()
	var z bytes.Buffer
	w, _ := flate.NewWriter(&z, flate.BestCompression)
	if _, err := w.Write(data); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return scenario.LinkPrefix + base64.RawURLEncoding.EncodeToString(z.Bytes())
}

// badInputs are the inputs the issue lists, each with words its message must contain.
func badInputs(t *testing.T) []struct{ name, text, want string } {
	good := link(t, example(t, "sparse-survey.json"))
	file, err := example(t, "sparse-survey.json").Encode()
	if err != nil {
		t.Fatal(err)
	}
	outOfRange := strings.Replace(string(file), `"alpha": 0.4`, `"alpha": -3`, 1)
	unknown := strings.Replace(string(file), `"kind": "l1",`, `"kind": "l1", "colour": "red",`, 1)
	if outOfRange == string(file) || unknown == string(file) {
		t.Fatal("the test's edits of the example did not apply")
	}
	return []struct{ name, text, want string }{
		{"empty", "", "empty"},
		{"white space", "  \n ", "empty"},
		{"only the prefix", scenario.LinkPrefix, "cut off"},
		{"truncated", good[:len(good)/2], "cut off"},
		{"wrong version", "s7." + good[3:], `version "s7."`},
		{"not base64", "s1.abc$def", "not base64url"},
		{"not deflate", scenario.LinkPrefix + base64.RawURLEncoding.EncodeToString([]byte("plain words, not compressed at all")), "not deflate"},
		{"deflate bomb", deflateCode(t, make([]byte, 6<<20)), "inflates to more than"},
		{"link out of range", deflateCode(t, []byte(outOfRange)), "design.alpha"},
		{"link with an unknown field", deflateCode(t, []byte(unknown)), "colour"},
		{"file text out of range", outOfRange, "design.alpha"},
		{"file text with an unknown field", unknown, "colour"},
		{"not a link at all", "hello there", "not a scenario link"},
		{"10 MB paste", strings.Repeat("A", 10<<20), "10485760 characters"},
	}
}

// TestShareRefusesBadInput opens each bad input as a paste, as an address (back/forward or
// an edited address) and as a file, and checks that the message names the problem and the
// open scenario, its figures, the history and the autosave stay as they were.
func TestShareRefusesBadInput(t *testing.T) {
	for _, tc := range badInputs(t) {
		t.Run(tc.name, func(t *testing.T) {
			b := newFake("")
			c, changes, _ := newShare(t, b)
			c.Figures, c.Have = Figures{MSE: 0.125}, true
			c.Observe()
			before, entries, stored := modelJSON(t, c.Model), append([]string(nil), b.entries...), b.store[AutosaveKey]
			*changes = 0
			untouched := func(how string) {
				t.Helper()
				if !strings.Contains(c.Message, tc.want) {
					t.Errorf("%s: message %q does not say %q", how, c.Message, tc.want)
				}
				if got := modelJSON(t, c.Model); got != before {
					t.Errorf("%s: the open scenario changed", how)
				}
				if *changes != 0 || !c.Have || c.Figures.MSE != 0.125 {
					t.Errorf("%s: the figures were dropped (%d changes)", how, *changes)
				}
				if !reflect.DeepEqual(b.entries, entries) || b.store[AutosaveKey] != stored {
					t.Errorf("%s: history or autosave changed", how)
				}
				c.Message = ""
			}

			b.input = tc.text
			c.OpenPaste()
			untouched("paste")
			if tc.name == "10 MB paste" {
				if b.input != "" {
					t.Errorf("the paste box keeps 10 MB")
				}
				c.OpenText(tc.text)
				untouched("text given directly")
			}

			if tc.name == "10 MB paste" || strings.HasPrefix(tc.name, "file text") {
				return
			}
			if tc.text == "" {
				// Back to an entry without a fragment: said as such.
				tc.want = "holds no scenario"
			}
			c.Navigated(tc.text)
			untouched("address")

			tc.want = strings.Replace(tc.want, "holds no scenario", "empty", 1)
			b.file.name, b.file.data, b.file.err = "from-a-colleague.txt", []byte(tc.text), nil
			c.OpenFile()
			untouched("file")
		})
	}
}

// TestShareBadLinkOnLoad: a bad link in the address keeps the autosaved scenario and says why.
func TestShareBadLinkOnLoad(t *testing.T) {
	b := newFake("")
	c, _, _ := newShare(t, b)
	c.OpenExample(Example{Title: "x", Scenario: example(t, "ridge-threshold.json")})
	want := modelJSON(t, c.Model)

	for _, tc := range badInputs(t) {
		if tc.text == "" || strings.TrimSpace(tc.text) == "" || tc.name == "10 MB paste" || strings.HasPrefix(tc.name, "file text") {
			continue
		}
		b2 := newFake(tc.text)
		b2.store = b.store
		stored := b.store[AutosaveKey]
		c2, changes, _ := newShare(t, b2)
		if got := modelJSON(t, c2.Model); got != want {
			t.Errorf("%s: the page did not keep the autosaved scenario", tc.name)
		}
		if !strings.Contains(c2.Message, tc.want) || !strings.Contains(c2.Message, "saved in this browser") {
			t.Errorf("%s: message %q", tc.name, c2.Message)
		}
		if *changes != 1 {
			t.Errorf("%s: %d evaluations asked, want 1", tc.name, *changes)
		}
		if b2.Fragment() != tc.text || b.store[AutosaveKey] != stored {
			t.Errorf("%s: the bad link or the autosave was overwritten before any change", tc.name)
		}
	}
}

// TestShareLinkRoundTrip: every example opened from its link in a fresh page gives the same
// scenario, study settings, notes and noise form included; the link lengths are logged.
func TestShareLinkRoundTrip(t *testing.T) {
	ex, err := Examples()
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ex {
		b := newFake("")
		c, _, _ := newShare(t, b)
		c.OpenExample(e)
		if c.Message != "" || c.Link == "" {
			t.Fatalf("%s: message %q, link %q", e.Name, c.Message, c.Link)
		}
		if !strings.HasPrefix(c.Link, b.addr+"#"+scenario.LinkPrefix) {
			t.Errorf("%s: link %q is not the address with the code", e.Name, c.Link)
		}
		t.Logf("%s: link of %d characters (code %d)", e.Name, len(c.Link), len(c.Link)-len(b.addr)-1)
		got := c.Model.Check()
		if got.Err != nil || !reflect.DeepEqual(got.Scenario, e.Scenario) {
			t.Errorf("%s: the model does not hold the example exactly (%v):\n got %+v\nwant %+v", e.Name, got.Err, got.Scenario, e.Scenario)
		}

		fresh := newFake(c.Link[len(b.addr)+1:])
		c2, _, _ := newShare(t, fresh)
		if c2.Message != "" || modelJSON(t, c2.Model) != modelJSON(t, c.Model) {
			t.Errorf("%s: the link opened as something else (%q)", e.Name, c2.Message)
		}
		if c2.Link != c.Link {
			t.Errorf("%s: the reopened scenario's link differs", e.Name)
		}
	}
}

// TestShareHistory: loads push entries, quick edits replace, an edit after a pause pushes,
// and Back reopens the earlier scenario without adding an entry.
func TestShareHistory(t *testing.T) {
	b := newFake("")
	c, changes, clk := newShare(t, b)
	if len(b.entries) != 1 || b.entries[0] == "" {
		t.Fatalf("the starting scenario did not go into the address: %q", b.entries)
	}
	a, r := example(t, "sparse-survey.json"), example(t, "ridge-threshold.json")
	c.OpenExample(Example{Title: a.Title, Scenario: a})
	c.OpenExample(Example{Title: r.Title, Scenario: r})
	if b.pushes != 2 || len(b.entries) != 3 {
		t.Fatalf("after two loads: %d pushes, entries %d", b.pushes, len(b.entries))
	}

	clk.t = clk.t.Add(time.Second)
	if err := c.Model.SetText(fieldID(t, c.Model, "noise.variance"), "0.02"); err != nil {
		t.Fatal(err)
	}
	c.Observe()
	if b.pushes != 2 {
		t.Errorf("an edit one second after a load pushed an entry")
	}
	if s, err := scenario.DecodeLink(b.Fragment()); err != nil || s.Noise.Variance != 0.02 {
		t.Errorf("the address does not follow the edit: %v %+v", err, s.Noise)
	}
	clk.t = clk.t.Add(PushPause)
	if err := c.Model.SetText(fieldID(t, c.Model, "noise.variance"), "0.03"); err != nil {
		t.Fatal(err)
	}
	c.Observe()
	if b.pushes != 3 {
		t.Errorf("an edit after a pause did not push an entry")
	}

	*changes = 0
	b.back()
	if s, _ := scenario.DecodeLink(b.Fragment()); s.Noise.Variance != 0.02 {
		t.Fatalf("history holds %+v", s.Noise)
	}
	if got := c.Model.Check(); got.Scenario.Noise.Variance != 0.02 || *changes != 1 {
		t.Errorf("Back did not reopen the earlier scenario: %+v, %d changes", got.Scenario.Noise, *changes)
	}
	b.back()
	if got := c.Model.Check(); got.Scenario.Title != a.Title {
		t.Errorf("second Back: %q, want %q", got.Scenario.Title, a.Title)
	}
	c.Observe()
	if b.pushes != 3 || len(b.entries) != 4 {
		t.Errorf("moving through the history added entries (%d pushes)", b.pushes)
	}
}

func fieldID(t *testing.T, m *Model, path string) string {
	t.Helper()
	for _, g := range Groups() {
		for _, f := range m.Fields(g.Name) {
			if f.Path == path {
				return f.ID
			}
		}
	}
	t.Fatalf("no input for %s", path)
	return ""
}

// TestShareAutosave: an edit and its figures are saved; a fresh page without a link restores
// them; a link on load keeps the previous work aside, and it can be reopened.
func TestShareAutosave(t *testing.T) {
	b := newFake("")
	c, _, _ := newShare(t, b)
	c.OpenExample(Example{Title: "t", Scenario: example(t, "ill-conditioned-array.json")})
	if err := c.Model.SetText(fieldID(t, c.Model, "penalty.l1"), "0.25"); err != nil {
		t.Fatal(err)
	}
	c.Observe()
	c.Figures, c.Have = Figures{MSE: 0.5, Iterations: 7, Converged: true}, true
	c.Observe()
	var sv saved
	if err := json.Unmarshal([]byte(b.store[AutosaveKey]), &sv); err != nil {
		t.Fatal(err)
	}
	if sv.Results == nil || sv.Results.MSE != 0.5 || sv.Engine != engine.Version {
		t.Errorf("autosave: %+v", sv)
	}
	want := modelJSON(t, c.Model)

	again := newFake("")
	again.store = b.store
	c2, _, _ := newShare(t, again)
	if modelJSON(t, c2.Model) != want || !strings.Contains(c2.Notice, "Restored") {
		t.Errorf("reopening did not restore the work (notice %q)", c2.Notice)
	}

	withLink := newFake(link(t, example(t, "sparse-survey.json")))
	withLink.store = b.store
	c3, _, _ := newShare(t, withLink)
	if c3.Model.Title != example(t, "sparse-survey.json").Title || !c3.hasBefore {
		t.Fatalf("the link did not open, or the earlier work was not kept (%q)", c3.Message)
	}
	c3.ReopenBefore()
	if modelJSON(t, c3.Model) != want || c3.hasBefore {
		t.Errorf("the earlier work did not come back: %q", c3.Message)
	}

	full := newFake("")
	full.storeErr = errors.New("QuotaExceededError")
	c4, _, _ := newShare(t, full)
	if !strings.Contains(c4.Message, "could not be saved") || !strings.Contains(c4.Message, "QuotaExceededError") {
		t.Errorf("a refused store: message %q", c4.Message)
	}
}

// TestShareLongSpectrum: a 2000-value empirical spectrum at full precision opens (the editor
// sums it up in one line) and, far too long for a link, offers the file; rounded to two
// decimals it opens and gives a link or says that the link is too long. A scenario whose link is too long says so, clears
// the address and offers the file, which opens back as the same scenario.
func TestShareLongSpectrum(t *testing.T) {
	b := newFake("")
	c, _, _ := newShare(t, b)
	rng := rand.New(rand.NewPCG(1, 2))
	spectrum := func(n int, decimals float64) []float64 {
		v := make([]float64, n)
		for i := range v {
			v[i] = math.Round((0.2+rng.Float64())*decimals) / decimals
		}
		return v
	}
	withLists := func(design, signal []float64) scenario.Scenario {
		s := example(t, "sparse-survey.json")
		s.Design = scenario.Design{Shape: "empirical-sv", Alpha: 0.5, Scale: scenario.ScaleRows, Lists: map[string][]float64{"values": design}}
		if signal != nil {
			s.Signal = scenario.Signal{Law: "empirical", Lists: map[string][]float64{"values": signal}}
		}
		s.Study = nil
		return s
	}

	fullSpec := withLists(spectrum(2000, 1e15), nil)
	c.OpenExample(Example{Title: "full precision", Scenario: fullSpec})
	if c.Message != "" {
		t.Fatalf("2000 values at full precision: %q", c.Message)
	}
	if ch := c.Model.Check(); ch.Err != nil || !reflect.DeepEqual(ch.Scenario.Design, fullSpec.Design) {
		t.Errorf("2000 values at full precision are not the editor's scenario: %v", ch.Err)
	}
	if c.Link != "" || !strings.Contains(c.NoLink, "too long") || c.linkState() != "too-long" {
		t.Errorf("2000 values at full precision: link %d characters, no-link %q", len(c.Link), c.NoLink)
	}

	short := withLists(spectrum(2000, 100), nil)
	c.OpenExample(Example{Title: "two decimals", Scenario: short})
	if c.Message != "" {
		t.Fatalf("2000 values at two decimals: %q", c.Message)
	}
	if c.Link != "" {
		back, err := scenario.DecodeLink(c.Link)
		if err != nil || !reflect.DeepEqual(back.Design, short.Design) {
			t.Errorf("the link of 2000 values does not hold them: %v", err)
		}
		t.Logf("2000 values at two decimals: a working link of %d characters", len(c.Link))
	} else if !strings.Contains(c.NoLink, "too long") {
		t.Errorf("2000 values at two decimals: neither a link nor 'too long': %q", c.NoLink)
	}

	long := withLists(spectrum(1400, 1e4), spectrum(1400, 1e4))
	letters := make([]byte, 3000)
	for i := range letters {
		letters[i] = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789"[rng.IntN(62)]
	}
	long.Notes = string(letters)
	if _, err := scenario.EncodeLink(long); err == nil {
		t.Fatal("the test's long scenario fits in a link")
	}
	c.OpenExample(Example{Title: "long", Scenario: long})
	if c.Message != "" {
		t.Fatal(c.Message)
	}
	if c.Link != "" || !strings.Contains(c.NoLink, "too long") || !strings.Contains(c.NoLink, "file") || c.linkState() != "too-long" {
		t.Fatalf("link %d characters, no-link %q", len(c.Link), c.NoLink)
	}
	if b.Fragment() != "" {
		t.Errorf("the address keeps an older scenario: reload would open it")
	}
	c.Copy()
	if !strings.Contains(c.Message, "too long") {
		t.Errorf("copy without a link: %q", c.Message)
	}
	c.SaveFile()
	var name string
	for n := range b.downloads {
		name = n
	}
	back, err := scenario.Decode(b.downloads[name])
	if err != nil || !reflect.DeepEqual(back, long) {
		t.Fatalf("the saved file %s does not hold the scenario: %v", name, err)
	}
	saved := modelJSON(t, c.Model)
	c2, _, _ := newShare(t, newFake(""))
	c2.Browser.(*fakeBrowser).file.name, c2.Browser.(*fakeBrowser).file.data = name, b.downloads[name]
	c2.OpenFile()
	if c2.Message != "" || modelJSON(t, c2.Model) != saved {
		t.Errorf("the file did not open as the same scenario: %q", c2.Message)
	}
}

// TestShareReport: the report holds the scenario, the figures and the engine version, needs
// figures, and opens back as its scenario.
func TestShareReport(t *testing.T) {
	b := newFake("")
	c, _, _ := newShare(t, b)
	c.Figures, c.Have = Figures{}, false
	c.SaveReport()
	if !strings.Contains(c.Message, "not computed") || len(b.downloads) != 0 {
		t.Errorf("a report without figures: %q", c.Message)
	}
	c.Figures, c.Have = Figures{MSE: 0.01, NMSEdB: -7, Converged: true, Iterations: 12}, true
	c.SaveReport()
	data := b.downloads["invented-example-sparse-signal-orthogonal-design-report.json"]
	var r struct {
		Kind     string
		Version  int
		Engine   string
		Scenario json.RawMessage
		Results  map[string]any
		Created  string
	}
	if err := json.Unmarshal(data, &r); err != nil {
		t.Fatalf("%v (downloads %v)", err, len(b.downloads))
	}
	if r.Kind != "hdrisk.report" || r.Version != 1 || r.Engine != engine.Version || r.Results["mse"] != 0.01 || r.Results["nmse_db"] != -7.0 {
		t.Errorf("report: %+v", r)
	}
	if _, err := time.Parse(time.RFC3339, r.Created); err != nil || !strings.HasPrefix(r.Created, "2026-03-01T12:00:00") {
		t.Errorf("created %q: %v", r.Created, err)
	}
	b.input = string(data)
	c.OpenPaste()
	if c.Message != "" || !strings.Contains(c.Notice, "Opened") {
		t.Errorf("a report pasted back: %q", c.Message)
	}
}

// TestShareCopy: the link reaches the clipboard, or the message says how to copy it by hand.
func TestShareCopy(t *testing.T) {
	b := newFake("")
	c, _, _ := newShare(t, b)
	c.Copy()
	if len(b.copied) != 1 || b.copied[0] != c.Link || !strings.Contains(c.Copied, "on the clipboard") {
		t.Errorf("copy: %q, %q", b.copied, c.Copied)
	}
	b.copyErr = errors.New("the link is selected in the box: press Ctrl+C")
	c.Copy()
	if !strings.Contains(c.Copied, "Ctrl+C") {
		t.Errorf("refused copy: %q", c.Copied)
	}
}

// TestExamplesMatchFiles: the page carries exactly the files of testdata/scenarios.
func TestExamplesMatchFiles(t *testing.T) {
	names, err := filepath.Glob(filepath.Join("..", "testdata", "scenarios", "*.json"))
	if err != nil || len(names) == 0 {
		t.Fatalf("no example files: %v", err)
	}
	if len(names) != len(exampleFiles) {
		t.Fatalf("%d files, %d carried: run go generate ./ui/", len(names), len(exampleFiles))
	}
	for i, n := range names {
		data, err := os.ReadFile(n)
		if err != nil {
			t.Fatal(err)
		}
		if exampleFiles[i].Name != filepath.Base(n) || exampleFiles[i].Data != string(data) {
			t.Errorf("%s differs from the carried copy: run go generate ./ui/", n)
		}
	}
	if _, err := Examples(); err != nil {
		t.Error(err)
	}
}

func TestFileName(t *testing.T) {
	for title, want := range map[string]string{
		"Invented example: ridge fit":     "invented-example-ridge-fit.json",
		`<img src=x onerror="alert(1)">`:  "img-src-x-onerror-alert-1.json",
		"../../etc/passwd":                "etc-passwd.json",
		"":                                "scenario.json",
		"Überschuss ümlaut":               "berschuss-mlaut.json",
		strings.Repeat("abcdefghij ", 20): "abcdefghij-abcdefghij-abcdefghij-abcdefghij-abcdefghij-abcde.json",
	} {
		if got := fileName(title, ".json"); got != want {
			t.Errorf("fileName(%q) = %q, want %q", title, got, want)
		}
	}
}
