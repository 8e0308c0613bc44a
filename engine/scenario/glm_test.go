package scenario

import (
	"errors"
	"strings"
	"testing"

	"hdrisk/engine/param"
)

const glmDoc = `{
  "kind": "hdrisk.scenario",
  "version": 1,
  "title": "2-bit sensing with outliers",
  "design": {"shape": "gaussian", "alpha": 0.8, "scale": "rows"},
  "signal": {"law": "bernoulli-gauss", "density": 0.1, "variance": 1},
  "noise": {"variance": 0.01, "law": "outliers", "fraction": 0.05, "outlier_variance": 4},
  "penalty": {"kind": "l1", "l1": 0.1},
  "readout": {"kind": "quantize", "bits": 2, "range": 2},
  "loss": {"kind": "huber", "width": 0.5}
}
`

func TestGLMGroupsRoundTrip(t *testing.T) {
	s, err := Decode([]byte(glmDoc))
	if err != nil {
		t.Fatal(err)
	}
	if !s.GLM() || s.Readout.Kind != "quantize" || s.Readout.Params["bits"] != 2 || s.Loss.Params["width"] != 0.5 ||
		s.Noise.Law.Kind != "outliers" || s.Noise.Law.Params["fraction"] != 0.05 {
		t.Fatalf("decoded %+v", s)
	}
	b, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	s2, err := Decode(b)
	if err != nil {
		t.Fatalf("%v\n%s", err, b)
	}
	b2, _ := s2.Encode()
	if string(b) != string(b2) {
		t.Errorf("not canonical:\n%s\n%s", b, b2)
	}
	link, err := EncodeLink(s)
	if err != nil {
		t.Fatal(err)
	}
	s3, err := DecodeLink(link)
	if err != nil {
		t.Fatal(err)
	}
	if b3, _ := s3.Encode(); string(b3) != string(b) {
		t.Errorf("link changed the scenario:\n%s\n%s", b3, b)
	}
	c, err := s.Check()
	if err != nil {
		t.Fatal(err)
	}
	g, ok := c.GLM()
	if !ok || g.Readout.Name() != "quantize" || g.Loss.Name() != "huber" || g.Noise.Name() != "outliers" || g.Noise.Variance() != 0.01 {
		t.Fatalf("GLM %+v %v", g, ok)
	}
}

func TestGLMPaths(t *testing.T) {
	s, err := Decode([]byte(glmDoc))
	if err != nil {
		t.Fatal(err)
	}
	for path, want := range map[string]float64{"bits": 2, "readout.range": 2, "fraction": 0.05, "outlier_variance": 4, "loss.width": 0.5} {
		if v, err := s.Get(path); err != nil || v != want {
			t.Errorf("Get(%s) = %v, %v; want %v", path, v, err, want)
		}
	}
	s4, err := s.With("bits", 4)
	if err != nil || s4.Readout.Params["bits"] != 4 || s.Readout.Params["bits"] != 2 {
		t.Fatalf("With bits: %v (%v, original %v)", err, s4.Readout.Params, s.Readout.Params)
	}
	if _, err := s.With("bits", 17); err == nil {
		t.Error("17 bits accepted")
	}
	if _, err := s.With("bits", 2.5); err == nil {
		t.Error("2.5 bits accepted")
	}
	s5, err := s.With("noise", 0.02)
	if err != nil || s5.Noise.Law == nil || s5.Noise.Law.Kind != "outliers" {
		t.Fatalf("setting the noise variance dropped the law: %v %+v", err, s5.Noise)
	}
	c, err := s.Check()
	if err != nil {
		t.Fatal(err)
	}
	b, err := c.Bind("bits")
	if err != nil {
		t.Fatal(err)
	}
	c3, err := b.At(3)
	if err != nil {
		t.Fatal(err)
	}
	if g, _ := c3.GLM(); g.Readout.(interface{ Bits() int }).Bits() != 3 {
		t.Errorf("bound bits did not reach the readout")
	}
}

func TestGLMRefusals(t *testing.T) {
	base := `{"kind": "hdrisk.scenario", "version": 1, "title": "t",
  "design": {"shape": "gaussian", "alpha": 2},
  "signal": {"law": "gauss", "variance": 1},
  "penalty": {"kind": "ridge", "l2": 0.1}`
	for name, c := range map[string]struct{ doc, field string }{
		"label loss, linear readout":  {`, "noise": {"variance": 0.1}, "loss": {"kind": "logistic"}}`, "loss.kind"},
		"hinge on quantize":           {`, "noise": {"variance": 0.1}, "readout": {"kind": "quantize", "bits": 2, "range": 1}, "loss": {"kind": "hinge"}}`, "loss.kind"},
		"logistic readout with noise": {`, "noise": {"variance": 0.1}, "readout": {"kind": "logistic"}, "loss": {"kind": "logistic"}}`, "noise.variance"},
		"unknown readout":             {`, "noise": {"variance": 0.1}, "readout": {"kind": "cubic"}}`, "readout.kind"},
		"bits missing":                {`, "noise": {"variance": 0.1}, "readout": {"kind": "quantize", "range": 1}}`, "readout.bits"},
		"dof too small":               {`, "noise": {"variance": 0.1, "law": "student-t", "dof": 2}}`, "noise.dof"},
		"fraction 1":                  {`, "noise": {"variance": 0.1, "law": "outliers", "fraction": 1, "outlier_variance": 3}}`, "noise.fraction"},
		"unknown law":                 {`, "noise": {"variance": 0.1, "law": "cauchy"}}`, "noise.law"},
		"param of another law":        {`, "noise": {"variance": 0.1, "law": "laplace", "dof": 3}}`, "noise.dof"},
		"huber width 0":               {`, "noise": {"variance": 0.1}, "loss": {"kind": "huber", "width": 0}}`, "loss.width"},
	} {
		_, err := Decode([]byte(base + c.doc))
		var fe *param.Error
		if !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%s: got %v, want a refusal of %s", name, err, c.field)
		}
	}
	// The logistic readout may leave the noise out.
	s, err := Decode([]byte(base + `, "readout": {"kind": "logistic"}, "loss": {"kind": "logistic"}}`))
	if err != nil || !s.GLM() {
		t.Fatalf("logistic readout without noise: %v", err)
	}
	if b, _ := s.Encode(); !strings.Contains(string(b), `"readout": {`) {
		t.Errorf("encoded without its readout:\n%s", b)
	}
}
