package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"hdrisk/engine/scenario"
)

// call runs the command line in-process and returns its exit status, stdout and stderr.
func call(t *testing.T, stdin string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

// failing checks the contract for errors: non-zero status, a message, nothing on stdout.
func failing(t *testing.T, want string, stdin string, args ...string) {
	t.Helper()
	code, out, errs := call(t, stdin, args...)
	if code == 0 || out != "" || !strings.Contains(errs, want) {
		t.Errorf("hdrisk %v: status %d, stdout %q, stderr %q; want a failure naming %q", args, code, out, errs, want)
	}
}

func examples(t *testing.T) []string {
	t.Helper()
	files, err := filepath.Glob("../../../testdata/scenarios/*.json")
	if err != nil || len(files) < 3 {
		t.Fatalf("examples: %v, %v", files, err)
	}
	return files
}

var evalFields = []string{"mse", "nmse", "nmse_db", "susceptibility", "nonzero_fraction", "tpp", "fdp",
	"train_error", "g1", "t1", "g2", "residual", "converged", "iterations", "estimate_zero"}

// TestEvalExamples evaluates every invented example and checks the output holds every
// field of contract 3 and that the fields agree with one another.
func TestEvalExamples(t *testing.T) {
	for _, f := range examples(t) {
		code, out, errs := call(t, "", "eval", f)
		if code != 0 {
			t.Fatalf("eval %s: status %d: %s", f, code, errs)
		}
		var r map[string]any
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatalf("eval %s: %v\n%s", f, err, out)
		}
		for _, k := range evalFields {
			if _, ok := r[k]; !ok {
				t.Errorf("eval %s: no %q", f, k)
			}
		}
		if r["converged"] != true {
			t.Errorf("eval %s did not converge: %s", f, out)
		}
		mse, nmse, db := r["mse"].(float64), r["nmse"].(float64), r["nmse_db"].(float64)
		data, _ := os.ReadFile(f)
		s, err := scenario.Decode(data)
		if err != nil {
			t.Fatal(err)
		}
		p, _ := s.Problem()
		if rho2 := p.Signal.Second(); !(mse >= 0) || math.Abs(nmse-mse/rho2) > 1e-12*nmse || math.Abs(db-10*math.Log10(nmse)) > 1e-9 {
			t.Errorf("eval %s: mse %v, nmse %v, nmse_db %v disagree (rho2 %v)", f, mse, nmse, db, rho2)
		}
		t.Logf("%s: mse %.6g, nmse_db %.4g, %v iterations", filepath.Base(f), mse, db, r["iterations"])
	}
}

// TestEvalMinNormLeastSquares checks eval against the minimum-norm least-squares error of
// a Gaussian design with rows scale, MSE = Delta / (alpha - 1) for alpha > 1 (Belkin, Hsu &
// Xu 2020, SIAM J. Math. Data Sci.; docs/method.md section 9), approached by ridge as l2 -> 0.
func TestEvalMinNormLeastSquares(t *testing.T) {
	data, err := os.ReadFile("../../../testdata/scenarios/ridge-threshold.json")
	if err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	s, err = s.With("l2", 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	in, err := s.Encode()
	if err != nil {
		t.Fatal(err)
	}
	code, out, errs := call(t, string(in), "eval", "-")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	var r struct{ MSE float64 }
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	want := 0.01 / (1.05 - 1)
	if math.Abs(r.MSE-want) > 1e-3*want {
		t.Errorf("mse %v, want %v", r.MSE, want)
	}
}

func TestLinkOpen(t *testing.T) {
	for _, f := range examples(t) {
		code, out, errs := call(t, "", "link", f)
		if code != 0 || !strings.HasPrefix(out, "s1.") {
			t.Fatalf("link %s: status %d, %q, %s", f, code, out, errs)
		}
		link := strings.TrimSpace(out)
		code, back, errs := call(t, "", "open", "https://example.org/hdrisk.html#"+link)
		if code != 0 {
			t.Fatalf("open: status %d: %s", code, errs)
		}
		want, _ := os.ReadFile(f)
		if back != string(want) {
			t.Errorf("open gives\n%s\nwant\n%s", back, want)
		}
		code, back2, _ := call(t, link+"\n", "open", "-")
		if code != 0 || back2 != back {
			t.Errorf("open - from stdin: status %d", code)
		}
		t.Logf("%s: %d characters", filepath.Base(f), len(link))
	}
}

func TestErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	doc, _ := os.ReadFile("../../../testdata/scenarios/sparse-survey.json")
	os.WriteFile(bad, bytes.Replace(doc, []byte(`"l1": 0.05`), []byte(`"l1": -0.05`), 1), 0o600)
	failing(t, "penalty.l1", "", "eval", bad)
	failing(t, "penalty.l1", "", "link", bad)
	failing(t, "no such file", "", "eval", filepath.Join(dir, "missing.json"))
	failing(t, "not valid JSON", "{", "eval", "-")
	failing(t, "missing scenario file", "", "eval")
	failing(t, "expected one scenario file", "", "eval", "a.json", "b.json")
	failing(t, "flag provided but not defined", "", "eval", "--colour", "-")
	failing(t, "version", "", "open", "s2.AAAA")
	failing(t, "not base64url", "", "open", "s1.a+b")
	failing(t, "unknown command", "", "frobnicate")
	failing(t, "usage", "")
	if code, _, _ := call(t, "", "eval"); code != 2 {
		t.Errorf("a usage mistake exits with %d, want 2", code)
	}
	if code, _, _ := call(t, "", "eval", bad); code != 1 {
		t.Errorf("a bad scenario exits with %d, want 1", code)
	}
}

func TestHelpAndFlagsAfterFile(t *testing.T) {
	code, out, _ := call(t, "", "help")
	if code != 0 {
		t.Fatalf("help: status %d", code)
	}
	for _, c := range commands {
		if !strings.Contains(out, c.name) {
			t.Errorf("help does not list %s", c.name)
		}
	}
	if code, out, _ := call(t, "", "eval", "-h"); code != 0 || !strings.Contains(out, "usage: hdrisk eval") {
		t.Errorf("eval -h: %d %q", code, out)
	}
	if code, out, _ := call(t, "", "check", "--help"); code != 0 || !strings.Contains(out, "-trials") {
		t.Errorf("check --help does not list its flags: %d %q", code, out)
	}
	f := examples(t)[0]
	code, a, errs := call(t, "", "eval", f, "--max-iter", "5000")
	if code != 0 {
		t.Fatalf("flags after the file: %d %s", code, errs)
	}
	_, b, _ := call(t, "", "eval", "--max-iter", "5000", f)
	if a != b {
		t.Errorf("flag order changes the result:\n%s\n%s", a, b)
	}
}

func TestNumberJSON(t *testing.T) {
	b, err := json.Marshal([]number{number(math.Inf(-1)), number(math.NaN()), 0.1, 1e-7, 1e21})
	if err != nil || string(b) != "[null,null,0.1,1e-7,1e+21]" {
		t.Errorf("got %s, %v", b, err)
	}
}
