package ui

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"github.com/vugu/vugu"

	"hdrisk/engine"
	"hdrisk/engine/scenario"
	"hdrisk/engine/study"
)

// Keys, limits and timing of sharing.
const (
	// AutosaveKey is the local-storage key of the working scenario and its last figures.
	AutosaveKey = "hdrisk.autosave"
	// AutosaveBeforeKey keeps the working scenario that a link opened on load replaced, so
	// that opening someone's link never loses one's own work.
	AutosaveBeforeKey = "hdrisk.autosave.before-link"
	// AutosaveUnreadableKey keeps an autosave the page could not read (damaged, or written
	// by a newer version), so that the starting scenario never overwrites the only copy: the
	// share panel offers it for download.
	AutosaveUnreadableKey = "hdrisk.autosave.unreadable"
	// MaxPaste is the longest text the paste box reads, in bytes: a link (scenario.MaxLinkInput)
	// or a scenario file (scenario.MaxBytes), both 4 MB. Longer text is refused before any
	// decoding.
	MaxPaste = scenario.MaxLinkInput
	// PushPause is how long the scenario must stay unchanged before an edit starts a new
	// history entry; quicker edits replace the current one, so Back skips over keystrokes of
	// one thought and returns to the scenario as it was before.
	PushPause = 3 * time.Second
	// TypingPause is how long the scenario must stay unchanged before an edit is published
	// (address, link, autosave), when the Browser offers a Timer: publishing encodes the
	// scenario and writes the address and storage, too much to do at every keystroke.
	TypingPause = 300 * time.Millisecond
	// FileInputID and PasteInputID are the element ids of the share panel's file box and
	// paste box.
	FileInputID  = "share-file"
	PasteInputID = "share-paste"
)

// saved is what autosave keeps in local storage.
type saved struct {
	Kind     string          `json:"kind"` // "hdrisk.autosave"
	Version  int             `json:"version"`
	Engine   string          `json:"engine"`
	Saved    string          `json:"saved"` // RFC 3339
	Scenario json.RawMessage `json:"scenario"`
	Results  *Figures        `json:"results,omitempty"` // figures of Scenario, when computed
	// Kept holds the kept curves in records written before the scenario's study carried
	// them (study.kept): it is read, no longer written.
	Kept []savedCurve `json:"kept,omitempty"`
}

// savedCurve is a kept curve in an earlier autosave: its scenario and axis.
type savedCurve struct {
	Label    string          `json:"label"`
	Scenario json.RawMessage `json:"scenario"`
	Axis     study.Axis      `json:"axis"`
}

// Report is the JSON report the page exports: the scenario, its figures and the engine
// version that computed them.
type Report struct {
	Kind     string          `json:"kind"` // "hdrisk.report"
	Version  int             `json:"version"`
	Engine   string          `json:"engine"`
	Scenario json.RawMessage `json:"scenario"`
	Results  Figures         `json:"results"`
	Created  string          `json:"created"` // RFC 3339, UTC
}

// Share moves the working scenario in and out of the page: the address (a link opened on
// load, back and forward), a link to copy, a paste box for a link, code or file text,
// scenario files, the JSON report, the example menu and autosave. Nothing it reads changes
// the open scenario unless all of it is valid; every refusal is a message naming what is
// wrong. Browser may be nil (the panel then says that sharing is unavailable).
type Share struct {
	Active bool // its tab is selected: only then is its markup built (see root.vugu)

	Model   *Model
	Browser Browser
	Changed func()            // evaluate the model again (Root.changed)
	Show    func(view string) // select a view's tab: this panel's ("share") to show a refusal
	Figures Figures
	Have    bool // Figures belong to the scenario in Model

	Message string // the last refusal, in words; "" when none
	Notice  string // the last success, in words
	Link    string // the full address of the working scenario; "" when there is none
	NoLink  string // why there is no link (invalid scenario, too long), in words
	Copied  string // result of the last copy: done, or how to copy by hand

	Now func() time.Time // clock; time.Now when nil

	seen       string    // fingerprint of the model when last published
	lastWrite  time.Time // when the address was last written
	figsSaved  bool      // the last autosave holds the figures of the working scenario
	hasBefore  bool      // a scenario replaced by a link on load is kept (see Before)
	unreadable bool      // an autosave that could not be read is kept (AutosaveUnreadableKey)
	started    bool

	waitGen  int    // counts the pauses waited for; a timer of an older one does nothing
	waitFP   string // the fingerprint whose pause is waited for
	stopWait func() // stops the timer of the pause waited for; nil when none
}

// Init opens the scenario the page starts with (see Start).
func (c *Share) Init(vugu.InitCtx) { c.Start() }

// Compute publishes edits as the page renders (see Observe).
func (c *Share) Compute(vugu.ComputeCtx) { c.Observe() }

func (c *Share) now() time.Time {
	if c.Now != nil {
		return c.Now()
	}
	return time.Now()
}

// Start opens what the page starts with: the link in the address if there is one, else the
// scenario autosaved in this browser, else the model as it is. A link that cannot be read
// keeps the autosaved (or starting) scenario and says what is wrong with the link. A good
// link that replaces different autosaved work keeps that work under AutosaveBeforeKey.
// Special cases are: a second call does nothing; without a Browser nothing is opened.
func (c *Share) Start() {
	if c.started {
		return
	}
	c.started = true
	if c.Browser == nil {
		return
	}
	c.Browser.OnFragment(c.Navigated)
	if g, ok := c.Browser.(InputGuard); ok {
		g.GuardInput(PasteInputID, MaxPaste, c.pasteRefused)
	}
	defer func() { _, c.hasBefore = c.Before() }()
	own, ownErr := c.restore()
	frag := c.Browser.Fragment()
	if frag == "" {
		switch {
		case ownErr != nil:
			c.fail("The scenario saved in this browser could not be restored, so the page starts afresh", ownErr)
			c.keepUnreadable()
		case own:
			c.Notice = "Restored the scenario you were working on: " + c.Model.Title
		}
		c.changed()
		c.publish(false)
		return
	}
	s, err := scenario.DecodeLink(frag)
	if err != nil {
		kept := "the starting scenario"
		if own {
			kept = "the scenario saved in this browser"
		}
		c.fail("The link could not be opened; the page shows "+kept+" instead", err)
		if ownErr != nil {
			c.keepUnreadable()
		}
		c.show("share")
		c.changed()
		// The address keeps the bad link until the next change, so the user can look at it.
		c.seen = c.fingerprint()
		return
	}
	ownFP := c.fingerprint()
	if err := c.load(s); err != nil {
		c.fail("The link could not be opened", err)
		c.changed()
		return
	}
	if ownErr != nil {
		c.keepUnreadable()
	}
	c.Notice = "Opened the scenario in the link: " + s.Title
	c.showStudy(s)
	if own && c.fingerprint() != ownFP {
		if before, ok := c.Browser.Load(AutosaveKey); ok && c.Browser.Store(AutosaveBeforeKey, before) == nil {
			c.Notice += ". The scenario you were working on is kept: reopen it below."
		} else {
			c.Message = "The scenario you were working on could not be kept aside in this browser; the link replaced it."
			c.show("share")
		}
	}
	c.changed()
	c.publish(false)
}

// restore loads the autosaved scenario into the model. It reports whether one was loaded;
// an unreadable save is an error and changes nothing.
func (c *Share) restore() (bool, error) {
	text, ok := c.Browser.Load(AutosaveKey)
	if !ok {
		return false, nil
	}
	var sv saved
	if err := json.Unmarshal([]byte(text), &sv); err != nil {
		return false, fmt.Errorf("it is not the page's own record (%v)", err)
	}
	if sv.Kind != AutosaveKey {
		return false, fmt.Errorf("it is not the page's own record (kind %q)", clip(sv.Kind, 40))
	}
	if sv.Version != 1 {
		return false, fmt.Errorf("it was written by another version of the page (record version %d, this page reads 1)", sv.Version)
	}
	s, err := scenario.Decode(sv.Scenario)
	if err != nil {
		return false, err
	}
	var kept []KeptCurve
	for i, k := range sv.Kept {
		ks, err := scenario.Decode(k.Scenario)
		if err != nil {
			return false, fmt.Errorf("kept curve %d: %w", i+1, err)
		}
		kept = append(kept, KeptCurve{Label: k.Label, Scenario: ks, Axis: k.Axis})
	}
	if err := c.load(s); err != nil {
		return false, err
	}
	if len(kept) > 0 {
		c.Model.SetKept(kept)
	}
	return true, nil
}

// keepUnreadable moves an autosave the page could not read out of the way of the next
// autosave, under AutosaveUnreadableKey, and offers it for download.
func (c *Share) keepUnreadable() {
	text, ok := c.Browser.Load(AutosaveKey)
	if !ok {
		return
	}
	if err := c.Browser.Store(AutosaveUnreadableKey, text); err != nil {
		c.Message += " It could not be kept aside either (" + err.Error() + "): save nothing here until you have copied it from the browser's storage."
		return
	}
	c.unreadable = true
	c.Message += " It is kept aside: download it below."
}

// Unreadable tells whether an autosave the page could not read is kept aside.
func (c *Share) Unreadable() bool { return c.unreadable }

// SaveUnreadable offers the autosave the page could not read as a file.
func (c *Share) SaveUnreadable() {
	text, ok := c.Browser.Load(AutosaveUnreadableKey)
	if !ok || text == "" {
		c.fail("There is no unreadable autosave kept in this browser", nil)
		return
	}
	c.download("hdrisk-unreadable-autosave.json", []byte(text), "Saved the unreadable autosave as hdrisk-unreadable-autosave.json.")
}

// Before returns the scenario a link opened on load replaced, if one was kept.
func (c *Share) Before() (scenario.Scenario, bool) {
	if c.Browser == nil {
		return scenario.Scenario{}, false
	}
	text, ok := c.Browser.Load(AutosaveBeforeKey)
	if !ok {
		return scenario.Scenario{}, false
	}
	var sv saved
	if json.Unmarshal([]byte(text), &sv) != nil {
		return scenario.Scenario{}, false
	}
	s, err := scenario.Decode(sv.Scenario)
	return s, err == nil
}

// ReopenBefore opens the scenario a link replaced (see Before) as a new history entry.
func (c *Share) ReopenBefore() {
	s, ok := c.Before()
	if !ok {
		c.fail("There is no earlier scenario kept in this browser", nil)
		return
	}
	if c.open(s, "Reopened the scenario you were working on before the link") {
		_ = c.Browser.Store(AutosaveBeforeKey, "")
		c.hasBefore = false
	}
}

// fingerprint sums up everything of the model that travels, cheaply enough for every render.
func (c *Share) fingerprint() string {
	var b strings.Builder
	b.WriteString(c.Model.Title)
	b.WriteByte(0)
	b.WriteString(c.Model.Notes)
	b.WriteByte(0)
	b.WriteString(c.Model.Scale)
	for _, g := range Groups() {
		b.WriteByte(0)
		b.WriteString(c.Model.Kind(g.Name))
		for _, f := range c.Model.Fields(g.Name) {
			b.WriteByte(0)
			b.WriteString(f.Text)
		}
	}
	b.WriteByte(0)
	v := c.Model.Views()
	st, _ := json.Marshal(c.Model.studyOfViews())
	b.Write(st)
	for _, k := range v.Kept {
		fmt.Fprintf(&b, "\x00%d", k.ID)
	}
	return b.String()
}

// Observe publishes the working scenario when it has changed since it was last published:
// the address follows it (a new history entry after a pause of PushPause, else in place of
// the current one), the link is renewed and the scenario is autosaved. With a Browser that
// offers a Timer, this waits until the scenario has stayed unchanged for TypingPause. It also
// autosaves the figures once they arrive. Invalid scenarios are neither published nor saved.
func (c *Share) Observe() {
	if !c.started || c.Browser == nil {
		return
	}
	if fp := c.fingerprint(); fp != c.seen {
		tm, ok := c.Browser.(Timer)
		if !ok {
			c.publish(c.now().Sub(c.lastWrite) >= PushPause)
			return
		}
		if c.stopWait != nil && fp == c.waitFP {
			return // renders that change nothing (figures, progress) do not restart the pause
		}
		if c.stopWait != nil {
			c.stopWait()
		}
		c.waitGen++
		c.waitFP = fp
		gen := c.waitGen
		c.stopWait = tm.After(TypingPause, func() bool {
			if gen != c.waitGen {
				return false
			}
			c.stopWait = nil
			c.flush()
			// What publishing changes (the link, a refusal) is shown on this panel only.
			return c.Active
		})
		return
	}
	if c.Have && !c.figsSaved {
		c.autosave()
	}
}

// flush publishes at once an edit that is waiting for the typing to pause.
func (c *Share) flush() {
	if c.stopWait != nil {
		c.stopWait()
		c.stopWait = nil
	}
	c.waitGen++
	if c.started && c.Browser != nil && c.fingerprint() != c.seen {
		c.publish(c.now().Sub(c.lastWrite) >= PushPause)
	}
}

// Timer runs a function later. The share panel uses it, when the Browser offers it, to
// publish an edit once the typing pauses.
type Timer interface {
	// After calls f after d, under the render lock, and renders the page if f returns true;
	// stop keeps f from being called if it has not been yet.
	After(d time.Duration, f func() (render bool)) (stop func())
}

// publish writes the working scenario to the address (push: as a new history entry) and
// autosaves it.
func (c *Share) publish(push bool) {
	c.seen = c.fingerprint()
	chk := c.Model.Check()
	if chk.Err != nil {
		c.Link, c.NoLink = "", "The link follows once the scenario is valid: "+chk.Err.Error()
		return
	}
	code, err := scenario.EncodeLink(chk.Scenario)
	if err != nil {
		c.Link, c.NoLink = "", "This scenario is too long for a link ("+reason(err)+"). Save it as a file below and send the file."
		// An address holding an older scenario would reopen that one on reload.
		c.Browser.SetFragment("", false)
	} else {
		c.Link, c.NoLink = c.Browser.Address()+"#"+code, ""
		c.Browser.SetFragment(code, push)
	}
	c.lastWrite = c.now()
	c.Copied = ""
	c.autosave()
}

// autosave keeps the working scenario, with its figures when they are computed, in local
// storage.
func (c *Share) autosave() {
	chk := c.Model.Check()
	if chk.Err != nil {
		return
	}
	sv := saved{Kind: AutosaveKey, Version: 1, Engine: engine.Version, Saved: c.now().UTC().Format(time.RFC3339), Scenario: chk.JSON}
	if c.Have {
		f := c.Figures
		sv.Results = &f
	}
	data, err := json.Marshal(sv)
	if err != nil && sv.Results != nil {
		// A figure JSON cannot hold (an infinite error): keep the scenario, which matters most.
		sv.Results = nil
		data, err = json.Marshal(sv)
	}
	if err == nil {
		err = c.Browser.Store(AutosaveKey, string(data))
	}
	if err != nil {
		c.fail("The scenario could not be saved in this browser; save it as a file to keep it", err)
	}
	c.figsSaved = c.Have
}

func (c *Share) show(view string) {
	if c.Show != nil {
		c.Show(view)
	}
}

// showStudy selects the view a scenario was last studied in, so that a link to a map opens
// on the map.
func (c *Share) showStudy(s scenario.Scenario) {
	if s.Study != nil && s.Study.View != "" {
		c.show(s.Study.View)
	}
}

// changed has the page evaluate the new working scenario; its figures are not known until
// the evaluation reports.
func (c *Share) changed() {
	c.Have = false
	if c.Changed != nil {
		c.Changed()
	}
}

// fail shows a refusal: what was being done and why. err may be nil.
func (c *Share) fail(what string, err error) {
	c.Notice = ""
	msg := what
	if err != nil {
		msg += ": " + describe(err)
	}
	if !strings.HasSuffix(msg, ".") {
		msg += "."
	}
	c.Message = msg
}

// describe words an error of the engine for the page: the link's reason ("it is cut off:
// …"), or the field of the scenario and its reason.
func describe(err error) string {
	var le *scenario.LinkError
	if errors.As(err, &le) {
		return le.Reason
	}
	var fe *scenario.FieldError
	if errors.As(err, &fe) {
		if fe.Field == "" {
			return "the scenario: " + fe.Reason
		}
		return "in the scenario, " + fe.Field + ": " + fe.Reason
	}
	return err.Error()
}

func reason(err error) string {
	var le *scenario.LinkError
	if errors.As(err, &le) {
		return le.Reason
	}
	return err.Error()
}

// open makes s the working scenario as a deliberate change: a new history entry, a new link
// and an autosave. Special cases are: a scenario the editor cannot hold changes nothing and
// is reported.
func (c *Share) open(s scenario.Scenario, notice string) bool {
	// What is opened from this panel (pasted, a file, an example) sets every view's
	// settings but leaves the page here, where the notice says what was opened; a link
	// opens on the view its study names (Start, Navigated).
	tab := c.Model.Views().Tab
	if err := c.load(s); err != nil {
		c.fail("The scenario could not be opened", err)
		return false
	}
	c.Model.showOnly(tab)
	c.Message, c.Notice = "", notice
	c.changed()
	if c.Browser != nil {
		c.publish(true)
	}
	return true
}

// load puts s into the model. Special cases are: a kind the editor does not offer is
// refused and changes nothing. A list of any length the scenario allows is taken: the editor
// shows a long one in one line (see compact) rather than in its box.
func (c *Share) load(s scenario.Scenario) error {
	return c.Model.Load(s)
}

// Navigated opens the scenario of a history entry (back, forward, or an address edited by
// hand) without adding an entry. A fragment that cannot be read changes nothing.
func (c *Share) Navigated(frag string) {
	defer func() {
		if c.Message != "" {
			c.show("share")
		}
	}()
	if frag == "" {
		c.fail("This page address holds no scenario (it was too long for a link), so the open scenario stays", nil)
		return
	}
	s, err := scenario.DecodeLink(frag)
	if err != nil {
		c.fail("The address could not be opened, so the open scenario stays", err)
		return
	}
	if err := c.load(s); err != nil {
		c.fail("The address could not be opened, so the open scenario stays", err)
		return
	}
	c.Message, c.Notice = "", "Opened from the history: "+s.Title
	c.showStudy(s)
	c.changed()
	// The address already holds this scenario: renew the link and the autosave only.
	c.seen = c.fingerprint()
	if code, err := scenario.EncodeLink(s); err == nil {
		c.Link, c.NoLink = c.Browser.Address()+"#"+code, ""
	}
	c.lastWrite = c.now()
	c.autosave()
}

// InputReader reads a text box of the page. The share panel uses it, when the Browser offers
// it, to read the paste box only when asked to open it, and to learn the length of the text
// before reading it: the page's event records copy a box's whole text at every event, which
// for a paste of many megabytes takes seconds.
type InputReader interface {
	// InputText returns the text of the input with the given id and its length in UTF-16
	// code units (never more than its length in UTF-8 bytes). Text longer than limit units
	// is not read: text is then "".
	InputText(id string, limit int) (text string, length int, err error)
	// ClearInput empties the input: a browser lays out many megabytes of text in a box
	// slowly at every change of the page, for seconds each time.
	ClearInput(id string)
}

// InputGuard refuses oversized text the moment it enters a text box. A browser lays out the
// text of a box before it draws the page again, which for a paste of many megabytes takes
// seconds to tens of seconds, so a refusal that waits for a button comes that late.
type InputGuard interface {
	// GuardInput watches the text box with the given id: a paste of more than limit UTF-16
	// code units is stopped before it enters the box, and any other way of putting more
	// text in it (dropping, typing, a script) empties the box at once. refused is then called
	// with the length of the text, under the render lock.
	GuardInput(id string, limit int, refused func(length int))
}

// pasteRefused says that the paste box refused a text of n characters (see InputGuard).
func (c *Share) pasteRefused(n int) {
	c.refuseSize(n)
	c.Message += " The paste box is left empty."
	c.show("share")
}

// OpenPaste opens the text of the paste box (see OpenText).
// Special cases are: a Browser that cannot read the box is reported.
func (c *Share) OpenPaste() {
	r, ok := c.Browser.(InputReader)
	if !ok {
		c.fail("The paste box cannot be read here", nil)
		return
	}
	text, n, err := r.InputText(PasteInputID, MaxPaste)
	if err != nil {
		c.fail("The paste box could not be read", err)
		return
	}
	if n > MaxPaste {
		r.ClearInput(PasteInputID)
		c.refuseSize(n)
		c.Message += " The paste box was emptied."
		return
	}
	c.OpenText(text)
}

func (c *Share) refuseSize(chars int) {
	c.fail(fmt.Sprintf("The pasted text has %d characters, more than a link or scenario may have (%d bytes, 4 MB); nothing was read, so the open scenario stays", chars, MaxPaste), nil)
}

// OpenText opens a pasted link, code ("s1.…") or scenario file text as a new history entry.
// Special cases are: text over MaxPaste bytes is refused before anything is decoded; empty
// or unreadable text, or an invalid scenario, is refused with the reason and changes nothing.
func (c *Share) OpenText(text string) {
	if len(text) > MaxPaste {
		c.refuseSize(utf8.RuneCountInString(text))
		return
	}
	t := strings.TrimSpace(text)
	if t == "" {
		c.fail("Nothing to open: the paste box is empty. Paste a link, a code starting with "+scenario.LinkPrefix+" or the text of a scenario file", nil)
		return
	}
	var s scenario.Scenario
	var err error
	what := "The pasted link could not be opened, so the open scenario stays"
	if strings.HasPrefix(t, "{") {
		what = "The pasted scenario could not be opened, so the open scenario stays"
		s, err = decodeFile([]byte(t))
	} else {
		s, err = scenario.DecodeLink(t)
	}
	if err != nil {
		c.fail(what, err)
		return
	}
	c.open(s, "Opened the pasted scenario: "+s.Title)
}

// decodeFile reads a scenario file, or the scenario inside a report the page exported.
func decodeFile(data []byte) (scenario.Scenario, error) {
	var head struct {
		Kind     string          `json:"kind"`
		Scenario json.RawMessage `json:"scenario"`
	}
	if json.Unmarshal(data, &head) == nil && head.Kind == ReportKind {
		if len(head.Scenario) == 0 {
			return scenario.Scenario{}, &scenario.FieldError{Field: "scenario", Reason: "is missing from the report"}
		}
		return scenario.Decode(head.Scenario)
	}
	return scenario.Decode(data)
}

// OpenFile reads the file chosen in the file box and opens it as a new history entry: a
// scenario file, a report the page exported, or a text file holding a link.
func (c *Share) OpenFile() {
	if c.Browser == nil {
		c.fail("Files cannot be read here", nil)
		return
	}
	c.Browser.ReadFile(FileInputID, scenario.MaxBytes, func(name string, data []byte, err error) {
		if err != nil {
			c.fail("The file could not be read, so the open scenario stays", err)
			return
		}
		// A scenario file is a JSON object; anything else may be a link saved as text.
		var s scenario.Scenario
		if t := bytes.TrimSpace(data); len(t) > 0 && t[0] == '{' {
			s, err = decodeFile(data)
		} else {
			s, err = scenario.DecodeLink(string(data))
		}
		if err != nil {
			c.fail("The file "+name+" could not be opened, so the open scenario stays", err)
			return
		}
		c.open(s, "Opened the file "+name+": "+s.Title)
	})
}

// OpenExample opens an invented example as a new history entry.
func (c *Share) OpenExample(e Example) {
	c.open(e.Scenario, "Opened the invented example: "+e.Title)
}

// Copy puts the link on the clipboard. If the browser refuses, the link stays selected in
// its box and the message says how to copy it by hand.
func (c *Share) Copy() {
	c.flush() // an edit still waiting for the typing to pause
	if c.Link == "" {
		c.fail("There is no link to copy: "+strings.TrimSuffix(c.NoLink, "."), nil)
		return
	}
	if c.Browser == nil {
		c.fail("The clipboard cannot be reached here", nil)
		return
	}
	link := c.Link
	c.Copied = "Copying…"
	c.Browser.Copy(link, func(err error) {
		if err != nil {
			c.Copied = "Not copied: " + err.Error()
			return
		}
		c.Copied = "The link is on the clipboard."
	})
}

// SaveFile offers the working scenario as a contract-1 JSON file.
func (c *Share) SaveFile() {
	chk := c.Model.Check()
	if chk.Err != nil {
		c.fail("The scenario cannot be saved until it is valid", chk.Err)
		return
	}
	c.download(fileName(chk.Scenario.Title, ".json"), chk.JSON, "Saved the scenario file")
}

// ReportKind names the report format.
const ReportKind = "hdrisk.report"

// BuildReport returns the JSON report of s, its figures and the engine version, created at t.
func BuildReport(s scenario.Scenario, f Figures, t time.Time) ([]byte, error) {
	data, err := s.Encode()
	if err != nil {
		return nil, err
	}
	r := Report{Kind: ReportKind, Version: 1, Engine: engine.Version, Scenario: data, Results: f,
		Created: t.UTC().Format(time.RFC3339)}
	return json.MarshalIndent(r, "", "  ")
}

// SaveReport offers the JSON report of the working scenario and its figures.
func (c *Share) SaveReport() {
	chk := c.Model.Check()
	if chk.Err != nil {
		c.fail("The report needs a valid scenario", chk.Err)
		return
	}
	if !c.Have {
		c.fail("The report needs the figures of this scenario, which are not computed yet", nil)
		return
	}
	data, err := BuildReport(chk.Scenario, c.Figures, c.now())
	if err != nil {
		c.fail("The report could not be made", err)
		return
	}
	c.download(fileName(chk.Scenario.Title, "-report.json"), data, "Saved the report")
}

func (c *Share) download(name string, data []byte, done string) {
	if c.Browser == nil {
		c.fail("Files cannot be saved here", nil)
		return
	}
	if err := c.Browser.Download(name, "application/json", data); err != nil {
		c.fail("The file could not be saved", err)
		return
	}
	c.Message, c.Notice = "", done+" "+name+"."
}

// fileName makes a file name from a title: letters and digits, words joined by '-', at
// most 60 characters, "scenario" when nothing is left.
func fileName(title, suffix string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(title) {
		ok := r < 128 && (unicode.IsLetter(r) || unicode.IsDigit(r))
		switch {
		case ok:
			if dash && b.Len() > 0 {
				b.WriteByte('-')
			}
			dash = false
			b.WriteRune(r)
		default:
			dash = true
		}
		if b.Len() >= 60 {
			break
		}
	}
	name := b.String()
	if name == "" {
		name = "scenario"
	}
	return name + suffix
}

func clip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n]) + "…"
}

func (c *Share) linkState() string {
	switch {
	case c.Link != "":
		return "ok"
	case strings.Contains(c.NoLink, "too long"):
		return "too-long"
	default:
		return "none"
	}
}
