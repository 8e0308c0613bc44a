package scenario

import (
	"slices"
	"strings"
	"unicode/utf8"
)

var topKeys = []string{"kind", "version", "title", "notes", "design", "signal", "noise", "penalty", "readout", "loss", "study"}

// Decode reads a scenario document (contract 1) strictly: the document is at most
// MaxBytes of UTF-8 JSON holding one object; every key is known at its level (a key
// given twice is refused); each shape, law and penalty kind takes exactly its own
// parameters; numbers are finite and in range; lists stay within their stated length.
// Optional values left out take their defaults (design.scale: rows, and the defaults the
// registries state), which Encode then writes out. Every refusal is a *FieldError
// naming the JSON path ("penalty.l1") and the reason.
func Decode(data []byte) (Scenario, error) {
	s, err := read(data)
	if err != nil {
		return Scenario{}, err
	}
	if err := s.Validate(); err != nil {
		return Scenario{}, err
	}
	return s, nil
}

// DecodeChecked is Decode returning the checked scenario, for a caller that goes on to
// solve or study it.
func DecodeChecked(data []byte) (Checked, error) {
	s, err := read(data)
	if err != nil {
		return Checked{}, err
	}
	return s.Check()
}

// read parses a document into a scenario without the checks that need the registries'
// constructors.
func read(data []byte) (Scenario, error) {
	if len(data) > MaxBytes {
		return Scenario{}, fieldErr("", "the document is %d bytes; the limit is %d bytes (4 MB)", len(data), MaxBytes)
	}
	if !utf8.Valid(data) {
		return Scenario{}, fieldErr("", "the document is not UTF-8 text")
	}
	tree, err := parseTree(data)
	if err != nil {
		return Scenario{}, err
	}
	return fromTree(tree)
}

// reader walks one JSON object, remembering which keys were read so that the rest can be
// reported as unknown, in document order.
type reader struct {
	path string
	v    *jval
	used map[string]bool
}

func newReader(path string, v *jval) (*reader, error) {
	if err := v.object(path); err != nil {
		return nil, err
	}
	return &reader{path: path, v: v, used: map[string]bool{}}, nil
}

func (r *reader) at(key string) string { return join(r.path, key) }

func (r *reader) get(key string) (*jval, bool) {
	v, ok := r.v.vals[key]
	if ok {
		r.used[key] = true
	}
	return v, ok
}

func (r *reader) need(key string) (*jval, error) {
	v, ok := r.get(key)
	if !ok {
		return nil, fieldErr(r.at(key), "missing")
	}
	return v, nil
}

func (r *reader) text(key string, required bool) (string, error) {
	v, ok := r.get(key)
	if !ok {
		if required {
			return "", fieldErr(r.at(key), "missing")
		}
		return "", nil
	}
	return v.text(r.at(key))
}

func (r *reader) float(key string, required bool) (float64, bool, error) {
	v, ok := r.get(key)
	if !ok {
		if required {
			return 0, false, fieldErr(r.at(key), "missing")
		}
		return 0, false, nil
	}
	x, err := v.float(r.at(key))
	return x, true, err
}

func (r *reader) integer(key string, lo, hi int64) (int64, error) {
	v, err := r.need(key)
	if err != nil {
		return 0, err
	}
	return v.integer(r.at(key), lo, hi)
}

func (r *reader) boolean(key string) (bool, error) {
	v, ok := r.get(key)
	if !ok {
		return false, nil
	}
	return v.boolean(r.at(key))
}

func objName(path string) string {
	if path == "" {
		return "a scenario"
	}
	return path
}

func fromTree(v *jval) (Scenario, error) {
	var s Scenario
	r, err := newReader("", v)
	if err != nil {
		return s, err
	}
	kv, ok := r.get("kind")
	if !ok {
		return s, fieldErr("kind", "missing: a scenario document holds \"kind\": %q", Kind)
	}
	if s.Kind, err = kv.text("kind"); err != nil {
		return s, err
	}
	if s.Kind != Kind {
		return s, fieldErr("kind", "must be %q, not %q", Kind, clip(s.Kind, 40))
	}
	vv, ok := r.get("version")
	if !ok {
		return s, fieldErr("version", "missing: this program reads version %d", Version)
	}
	ver, err := vv.integer("version", 0, 1<<31-1)
	if err != nil {
		return s, err
	}
	if ver != Version {
		return s, fieldErr("version", "this program reads version %d, not %d", Version, ver)
	}
	s.Version = int(ver)
	if err := r.restExcept(topKeys); err != nil {
		return s, err
	}
	if s.Title, err = r.text("title", true); err != nil {
		return s, err
	}
	if s.Notes, err = r.text("notes", false); err != nil {
		return s, err
	}
	if s.Design, err = readDesign(r); err != nil {
		return s, err
	}
	if s.Signal, err = readSignal(r); err != nil {
		return s, err
	}
	if s.Noise, err = readNoise(r); err != nil {
		return s, err
	}
	if s.Penalty, err = readPenalty(r); err != nil {
		return s, err
	}
	if s.Readout, err = readChoice(r, readouts()); err != nil {
		return s, err
	}
	if s.Loss, err = readChoice(r, losses()); err != nil {
		return s, err
	}
	if sv, ok := r.get("study"); ok {
		st, err := readStudy(sv)
		if err != nil {
			return s, err
		}
		s.Study = &st
	}
	return s, nil
}

// readKind reads the object of one family: the key naming the kind, then exactly the
// kind's parameters (with defaults for optional ones left out). extra lists the keys
// the object takes besides the kind and its parameters (design.alpha, design.scale).
func readKind(parent *reader, f *family, extra []string) (*reader, kindSpec, map[string]float64, map[string][]float64, error) {
	v, err := parent.need(f.Object)
	if err != nil {
		return nil, kindSpec{}, nil, nil, err
	}
	r, err := newReader(f.Object, v)
	if err != nil {
		return nil, kindSpec{}, nil, nil, err
	}
	name, err := r.text(f.Key, true)
	if err != nil {
		return nil, kindSpec{}, nil, nil, err
	}
	k, ok := f.find(name)
	if !ok {
		return nil, kindSpec{}, nil, nil, fieldErr(r.at(f.Key), "unknown %s %q (known: %s)", f.Noun, clip(name, 40), f.names())
	}
	for _, key := range r.v.keys {
		if key == f.Key || slices.Contains(extra, key) {
			continue
		}
		if _, ok := k.param(key); ok {
			continue
		}
		if f.isParamOfAny(key) {
			return nil, k, nil, nil, notParam(f, k, key)
		}
		accepted := append(append([]string{f.Key}, extra...), paramNames(k)...)
		return nil, k, nil, nil, fieldErr(r.at(key), "unknown field (%s %s takes %s)", f.Noun, k.Name, strings.Join(accepted, ", "))
	}
	var params map[string]float64
	var lists map[string][]float64
	for _, p := range k.Params {
		pv, ok := r.get(p.Name)
		if !ok {
			if !p.Optional {
				return nil, k, nil, nil, missing(f, k, p.Name)
			}
			if p.List {
				continue
			}
			pv = &jval{kind: jNumber, num: num(p.Default)}
		}
		if p.List {
			l, err := readList(pv, r.at(p.Name), p.MaxLen)
			if err != nil {
				return nil, k, nil, nil, err
			}
			if lists == nil {
				lists = map[string][]float64{}
			}
			lists[p.Name] = l
			continue
		}
		x, err := pv.float(r.at(p.Name))
		if err != nil {
			return nil, k, nil, nil, err
		}
		if params == nil {
			params = map[string]float64{}
		}
		params[p.Name] = x
	}
	return r, k, params, lists, nil
}

func paramNames(k kindSpec) []string {
	n := make([]string, len(k.Params))
	for i, p := range k.Params {
		n[i] = p.Name
	}
	return n
}

func readList(v *jval, path string, maxLen int) ([]float64, error) {
	if v.kind != jArray {
		return nil, fieldErr(path, "must be a list of numbers, not %v", v.kind)
	}
	if len(v.arr) > maxLen {
		return nil, fieldErr(path, "holds %d numbers; the limit is %d", len(v.arr), maxLen)
	}
	l := make([]float64, len(v.arr))
	for i, e := range v.arr {
		x, err := e.float(sprintf("%s[%d]", path, i))
		if err != nil {
			return nil, err
		}
		l[i] = x
	}
	return l, nil
}

func readDesign(top *reader) (Design, error) {
	r, k, params, lists, err := readKind(top, designs(), []string{"alpha", "scale"})
	if err != nil {
		return Design{}, err
	}
	d := Design{Shape: k.Name, Params: params, Lists: lists, Scale: ScaleRows}
	if d.Alpha, _, err = r.float("alpha", true); err != nil {
		return d, err
	}
	if sv, ok := r.get("scale"); ok {
		if d.Scale, err = sv.text("design.scale"); err != nil {
			return d, err
		}
	}
	return d, nil
}

func readSignal(top *reader) (Signal, error) {
	_, k, params, lists, err := readKind(top, signals(), nil)
	if err != nil {
		return Signal{}, err
	}
	return Signal{Law: k.Name, Params: params, Lists: lists}, nil
}

func readPenalty(top *reader) (Penalty, error) {
	_, k, params, _, err := readKind(top, penalties(), nil)
	if err != nil {
		return Penalty{}, err
	}
	return Penalty{Kind: k.Name, Params: params}, nil
}

func readNoise(top *reader) (Noise, error) {
	if _, ok := top.v.vals["noise"]; !ok && noiseMayLack(top) {
		return Noise{}, nil
	}
	v, err := top.need("noise")
	if err != nil {
		return Noise{}, err
	}
	r, err := newReader("noise", v)
	if err != nil {
		return Noise{}, err
	}
	law, lawKeys, err := readNoiseLaw(r)
	if err != nil {
		return Noise{}, err
	}
	if err := r.restExcept(append([]string{"variance", "snr_db"}, lawKeys...)); err != nil {
		return Noise{}, err
	}
	_, hasVar := r.v.vals["variance"]
	_, hasSNR := r.v.vals["snr_db"]
	switch {
	case hasVar && hasSNR:
		return Noise{}, fieldErr("noise", "give variance or snr_db, not both")
	case hasSNR:
		x, _, err := r.float("snr_db", true)
		return Noise{SNRdB: x, SNR: true, Law: law}, err
	case hasVar:
		x, _, err := r.float("variance", true)
		return Noise{Variance: x, Law: law}, err
	}
	return Noise{}, fieldErr("noise.variance", "missing: state the noise as variance (or as snr_db)")
}

// restExcept reports the first key of the object that is not among accepted.
func (r *reader) restExcept(accepted []string) error {
	for _, k := range r.v.keys {
		if !slices.Contains(accepted, k) {
			return fieldErr(r.at(k), "unknown field (%s takes %s)", objName(r.path), strings.Join(accepted, ", "))
		}
	}
	return nil
}
