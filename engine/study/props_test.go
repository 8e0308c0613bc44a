package study_test

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	"hdrisk/engine/design"
	"hdrisk/engine/fixedpoint"
	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/scenario"
	"hdrisk/engine/signal"
)

var propVerbose = flag.Bool("hdrisk.props.v", false, "log every refusal of TestRandomScenarios")

// propCount is 20000 by default, the count the issue asks of CI: 31 s measured for the whole
// test on a 2-core machine; -hdrisk.props=N (more) runs a larger check.
var propCount = flag.Int("hdrisk.props", 20000, "number of random scenarios of TestRandomScenarios")

// domain is the part of a registry parameter that the generator reads.
type domain struct {
	name             string
	min, max         float64
	minOpen, maxOpen bool
	list             bool
	maxLen           int
}

// draw returns a number of the domain: log-uniform over [1e-4, 1e4] most of the time, over
// [1e-150, 1e150] a fifth of the time, and an edge of the domain (its ends, the numbers next
// to them, 0, 1, 1e+-150) a tenth of the time. Beyond 1e+-150 the solver's reach is stated
// by the table tests of the examples (1e300, 1e308), not sampled here.
func (d domain) draw(rng *rand.Rand) float64 {
	lo, hi := d.min, d.max
	for range 100 {
		var x float64
		switch u := rng.Float64(); {
		case u < 0.1:
			edges := []float64{lo, hi, 0, 1, math.Nextafter(lo, hi), math.Nextafter(hi, lo), 1e-150, 1e150, -1e150}
			x = edges[rng.IntN(len(edges))]
		case u < 0.3:
			x = math.Pow(10, -150+300*rng.Float64())
		default:
			x = math.Pow(10, -4+8*rng.Float64())
		}
		if lo < 0 && rng.IntN(2) == 0 {
			x = -x
		}
		if hi <= 1 && !(u01(x) && x <= hi) {
			x = lo + (hi-lo)*rng.Float64()
		}
		if d.contains(x) {
			return x
		}
	}
	return math.Max(lo, math.Min(hi, 1))
}

func u01(x float64) bool { return x >= 0 && x <= 1 }

func (d domain) contains(x float64) bool {
	return !(math.IsNaN(x) || math.IsInf(x, 0) || x < d.min || x > d.max || (d.minOpen && x == d.min) || (d.maxOpen && x == d.max))
}

// randomScenario returns the JSON text of a random scenario over the registries' domains.
func randomScenario(rng *rand.Rand) string {
	shapes := design.Shapes()
	sh := shapes[rng.IntN(len(shapes))]
	d := map[string]any{"shape": sh.Name, "scale": []string{"rows", "columns", "as-given"}[rng.IntN(3)]}
	d["alpha"] = domain{min: 0, max: scenario.MaxAlpha, minOpen: true}.draw(rng)
	if rng.IntN(2) == 0 {
		d["alpha"] = math.Pow(10, -3+5*rng.Float64())
	}
	for _, p := range sh.Params {
		fill(rng, d, domain{p.Name, p.Min, p.Max, p.MinOpen, p.MaxOpen, p.List, p.MaxLen})
	}
	if lo, ok := d["min"].(float64); ok {
		if hi := d["max"].(float64); lo > hi {
			d["min"], d["max"] = hi, lo
		}
	}
	laws := signal.Laws()
	lw := laws[rng.IntN(len(laws))]
	s := map[string]any{"law": lw.Name}
	if lw.Name == "gauss-mixture" {
		k := 1 + rng.IntN(5)
		if rng.IntN(10) == 0 {
			k = 65 + rng.IntN(40)
		}
		w, m, v := make([]float64, k), make([]float64, k), make([]float64, k)
		sum := 0.0
		for i := range w {
			w[i] = rng.Float64()
			sum += w[i]
			m[i] = domain{min: -math.Inf(1), max: math.Inf(1), minOpen: true, maxOpen: true}.draw(rng)
			v[i] = domain{min: 0, max: math.Inf(1), maxOpen: true}.draw(rng)
		}
		for i := range w {
			w[i] /= sum
		}
		s["weights"], s["means"], s["variances"] = w, m, v
	} else {
		for _, p := range lw.Params {
			fill(rng, s, domain{p.Name, p.Min, p.Max, p.MinOpen, p.MaxOpen, p.List, p.MaxLen})
		}
	}
	kinds := penalty.Kinds()
	kd := kinds[rng.IntN(len(kinds))]
	pen := map[string]any{"kind": kd.Name}
	for _, p := range kd.Params {
		if p.Optional && rng.IntN(3) == 0 {
			continue
		}
		fill(rng, pen, domain{p.Name, p.Min, p.Max, p.MinOpen, p.MaxOpen, false, 0})
	}
	noise := map[string]any{"variance": domain{min: 0, max: scenario.MaxNoiseVar}.draw(rng)}
	if rng.IntN(5) == 0 {
		noise = map[string]any{"snr_db": scenario.MinSNRdB + (scenario.MaxSNRdB-scenario.MinSNRdB)*rng.Float64()}
	}
	doc := map[string]any{"kind": "hdrisk.scenario", "version": 1, "title": "random property-test scenario",
		"design": d, "signal": s, "noise": noise, "penalty": pen}
	b, err := json.Marshal(doc)
	if err != nil {
		panic(err)
	}
	return string(b)
}

func fill(rng *rand.Rand, obj map[string]any, d domain) {
	if !d.list {
		obj[d.name] = d.draw(rng)
		return
	}
	n := 1 + rng.IntN(6)
	if rng.IntN(10) == 0 {
		n = 1 + rng.IntN(200)
	}
	n = min(n, d.maxLen)
	x := make([]float64, n)
	for i := range x {
		x[i] = d.draw(rng)
	}
	obj[d.name] = x
}

// TestRandomScenarios solves random valid scenarios drawn from the registries' domains (fixed
// seed; 20000 by default, -hdrisk.props=N for another count, at most 2000 under -short): every
// one is solved with finite observables in range, or refused with an error that names a
// field; none may be beyond the solver's reach (bracketing failed, or not converged with its
// residual), and any such is listed. It logs the counts by outcome and the 20 slowest draws.
func TestRandomScenarios(t *testing.T) {
	n := *propCount
	if testing.Short() {
		n = min(n, 2000)
	}
	rng := rand.New(rand.NewPCG(14, 2026))
	counts := map[string]int{}
	reasons := map[string]int{}
	beyond := 0
	// The slowest draws, logged at the end: where the solver spends the test's time.
	type slow struct {
		el  time.Duration
		i   int
		doc string
	}
	var slowest []slow
	var total time.Duration
	// The draws come in order from the one generator; the solves, which are independent, run
	// on every processor, and their outcomes are read in order below.
	type outcome struct {
		doc            string
		decErr, preErr error
		r              fixedpoint.Result
		err            error
		el             time.Duration
	}
	out := make([]outcome, n)
	for i := range out {
		out[i].doc = randomScenario(rng)
	}
	var wg sync.WaitGroup
	next := make(chan int)
	for range runtime.GOMAXPROCS(0) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				o := &out[i]
				sc, err := scenario.Decode([]byte(o.doc))
				if err != nil {
					o.decErr = err
					continue
				}
				p, err := sc.Problem()
				if err != nil {
					o.preErr = err
					continue
				}
				t0 := time.Now()
				o.r, o.err = fixedpoint.Solve(p, fixedpoint.Options{})
				o.el = time.Since(t0)
			}
		}()
	}
	for i := range n {
		next <- i
	}
	close(next)
	wg.Wait()
	for i := range n {
		doc := out[i].doc
		if err := out[i].decErr; err != nil {
			var fe *scenario.FieldError
			if !errors.As(err, &fe) || fe.Field == "" {
				t.Errorf("scenario %d: decoder refusal without a field: %v\n%s", i, err, doc)
			}
			counts["refused by the decoder (a rule across fields)"]++
			reasons[fieldOf(err)]++
			continue
		}
		if err := out[i].preErr; err != nil {
			counts["refused while building the problem"]++
			reasons[fieldOf(err)]++
			if fieldOf(err) == "" {
				t.Errorf("scenario %d: refusal without a field: %v\n%s", i, err, doc)
			}
			continue
		}
		r, err, el := out[i].r, out[i].err, out[i].el
		total += el
		if len(slowest) < 20 || el > slowest[len(slowest)-1].el {
			slowest = append(slowest, slow{el, i, doc})
			sort.Slice(slowest, func(a, b int) bool { return slowest[a].el > slowest[b].el })
			slowest = slowest[:min(len(slowest), 20)]
		}
		if err != nil {
			var fe *param.Error
			switch {
			case !errors.As(err, &fe) || fe.Field == "":
				t.Errorf("scenario %d: refusal without a field: %v\n%s", i, err, doc)
			case strings.Contains(fe.Reason, "bracketed"):
				beyond++
				counts["beyond the solver's reach (refused, to be reported)"]++
				t.Logf("scenario %d: %v\n%s", i, err, doc)
				continue
			}
			counts["refused by the solver"]++
			reasons["solver: "+fieldOf(err)]++
			if *propVerbose {
				t.Logf("scenario %d: %v\n%s", i, err, doc)
			}
			continue
		}
		if msg := badResult(r); msg != "" {
			t.Errorf("scenario %d: %s: %+v\n%s", i, msg, r, doc)
		}
		switch {
		case !r.Converged:
			counts["not converged (marked, with its residual)"]++
			beyond++
			if r.Note == "" {
				t.Errorf("scenario %d: not converged without a note: %+v\n%s", i, r, doc)
			}
			t.Logf("scenario %d: not converged: %+v\n%s", i, r, doc)
		case r.EstimateZero:
			counts["zero estimate"]++
		case r.Floor:
			counts["below the floor"]++
		default:
			counts["solved"]++
		}
	}
	// Every scenario is solved or refused for a stated reason: none may be left beyond the
	// solver's reach. (The last four of the first 20000 were a box bound or Huber width near
	// 1.8e308 standardized to +-Inf in the scalar channel, a signal of power 2e-196 whose cold
	// start was g1 = 1/t in units of x0^2, and a design given as is with eigenvalues of 1e-267
	// whose S2 overflowed before the change of units; at 100000 draws, four Student-t laws of
	// scale near 1e150 and a density of 5e-324; see docs/method.md sections 3.8 and 3.11.)
	if beyond > 0 {
		t.Errorf("%d of %d scenarios beyond the solver's reach (listed above), where none may be", beyond, n)
	}
	t.Logf("%d scenarios, %v in Solve (summed over %d processors); the slowest %d:", n, total, runtime.GOMAXPROCS(0), len(slowest))
	for _, sl := range slowest {
		t.Logf("  scenario %d took %v: %s", sl.i, sl.el, sl.doc)
	}
	for _, k := range sortedKeys(counts) {
		t.Logf("  %-48s %6d", k, counts[k])
	}
	t.Logf("refusals by field:")
	for _, k := range sortedKeys(reasons) {
		t.Logf("  %-48s %6d", k, reasons[k])
	}
}

func fieldOf(err error) string {
	if fe := (*param.Error)(nil); errors.As(err, &fe) {
		return fe.Field
	}
	return ""
}

// badResult names the first impossible number of r, or returns "".
func badResult(r fixedpoint.Result) string {
	for name, x := range map[string]float64{"MSE": r.MSE, "NMSE": r.NMSE, "NMSEdB": r.NMSEdB, "susceptibility": r.Susceptibility,
		"g1": r.G1, "t1": r.T1, "g2": r.G2, "train error": r.TrainError, "residual": r.Residual} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Sprintf("%s is %v", name, x)
		}
	}
	for name, x := range map[string]float64{"nonzero fraction": r.NonZero, "TPP": r.TPP, "FDP": r.FDP} {
		if !(x >= 0 && x <= 1) {
			return fmt.Sprintf("%s = %v outside [0, 1]", name, x)
		}
	}
	if !(r.Susceptibility > 0) || r.MSE < 0 || r.TrainError < 0 {
		return "negative or zero where positive"
	}
	return ""
}

func sortedKeys(m map[string]int) []string {
	k := make([]string, 0, len(m))
	for s := range m {
		k = append(k, s)
	}
	sort.Strings(k)
	return k
}
