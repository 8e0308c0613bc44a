package ui

import (
	"fmt"
	"strconv"
	"strings"
	"sync"

	"github.com/vugu/vugu"

	"hdrisk/engine/scenario"
)

//go:generate go run ./examplesmake

// exampleFile is one scenario file carried inside the page.
type exampleFile struct {
	Name string // file name under testdata/scenarios
	Data string // its contents
}

// Example is an invented example scenario offered in the page's menu.
type Example struct {
	Name     string // file name, e.g. "sparse-survey.json"
	Title    string // its title, shown as text
	Scenario scenario.Scenario
}

// Examples decodes the example scenarios carried by the page, in file-name order.
// Special cases are: an example the engine refuses is an error naming its file (a test
// keeps this from reaching the page).
func Examples() ([]Example, error) {
	out := make([]Example, 0, len(exampleFiles))
	for _, f := range exampleFiles {
		s, err := scenario.Decode([]byte(f.Data))
		if err != nil {
			return nil, fmt.Errorf("example %s: %w", f.Name, err)
		}
		if !strings.Contains(strings.ToLower(s.Title), "invented") {
			return nil, fmt.Errorf("example %s: its title %q does not say that it is invented", f.Name, s.Title)
		}
		out = append(out, Example{Name: f.Name, Title: s.Title, Scenario: s})
	}
	return out, nil
}

var (
	exampleList []Example
	exampleErr  error
	exampleOnce sync.Once
)

func loadedExamples() ([]Example, error) {
	exampleOnce.Do(func() { exampleList, exampleErr = Examples() })
	return exampleList, exampleErr
}

func (c *ExamplesMenu) list() []Example {
	l, _ := loadedExamples()
	return l
}

func (c *ExamplesMenu) problem() string {
	if _, err := loadedExamples(); err != nil {
		return "The examples could not be read: " + err.Error()
	}
	return ""
}

func (c *ExamplesMenu) picked(e vugu.DOMEvent) {
	i, err := strconv.Atoi(e.PropString("target", "value"))
	l := c.list()
	if err != nil || i < 0 || i >= len(l) || c.Pick == nil {
		return
	}
	c.Pick(l[i])
}
