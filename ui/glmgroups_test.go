package ui

import (
	"strings"
	"testing"

	"hdrisk/engine/scenario"
)

// A 1-bit scenario built in the editor's model writes the readout group, reads back the
// same, and a label loss keeps the readout and loss a pair the engine accepts.
func TestGLMGroupsInTheModel(t *testing.T) {
	m := NewModel()
	if data, _ := m.JSON(); strings.Contains(string(data), "readout") || strings.Contains(string(data), "loss") {
		t.Fatalf("today's model writes the new groups:\n%s", data)
	}
	if err := m.SetKind("readout", "quantize"); err != nil {
		t.Fatal(err)
	}
	var bits string
	for _, f := range m.Fields("readout") {
		if f.Path == "readout.bits" {
			bits = f.ID
		}
	}
	if err := m.SetText(bits, "1"); err != nil {
		t.Fatal(err)
	}
	data, err := m.JSON()
	if err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Decode(data)
	if err != nil || s.Readout == nil || s.Readout.Params["bits"] != 1 {
		t.Fatalf("%v\n%s", err, data)
	}
	m2 := NewModel()
	if err := m2.Load(s); err != nil {
		t.Fatal(err)
	}
	if d2, _ := m2.JSON(); string(d2) != string(data) {
		t.Errorf("load changed the scenario:\n%s\n%s", d2, data)
	}
	if err := m2.SetKind("loss", "hinge"); err != nil || m2.Kind("readout") != "sign" {
		t.Errorf("hinge left the readout at %s (%v)", m2.Kind("readout"), err)
	}
	if err := m2.SetKind("readout", "linear"); err != nil || m2.Kind("loss") != "square" {
		t.Errorf("the linear readout left the loss at %s (%v)", m2.Kind("loss"), err)
	}
	if err := m2.SetKind("noise-law", "outliers"); err != nil {
		t.Fatal(err)
	}
	c := m2.Check()
	if c.Err != nil || c.Scenario.Noise.Law == nil || c.Scenario.Noise.Law.Kind != "outliers" {
		t.Errorf("outliers: %v %+v", c.Err, c.Scenario.Noise)
	}
}
