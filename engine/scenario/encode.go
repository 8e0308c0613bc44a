package scenario

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
)

// node is a JSON value in canonical order: an object (keys in order), a list of numbers,
// or a literal already rendered.
type node struct {
	keys []string
	vals []node
	nums []float64 // a list of numbers, written as flt writes each
	list []node    // a list of other values, when set
	lit  string
	kind jkind
}

func (n *node) set(key string, v node) {
	n.keys = append(n.keys, key)
	n.vals = append(n.vals, v)
}

func obj() node { return node{kind: jObject} }

func str(s string) node {
	b, _ := json.Marshal(s)
	return node{kind: jString, lit: string(b)}
}

// flt renders a float as encoding/json does (shortest form that reads back exactly).
func flt(x float64) node { return node{kind: jNumber, lit: string(appendFloat(nil, x))} }

// appendFloat appends x as encoding/json writes a finite float64: the shortest decimal
// that reads back exactly, in exponent form below 1e-6 and from 1e21 on, with a one-digit
// negative exponent written without its leading zero ("1e-7", not "1e-07").
func appendFloat(b []byte, x float64) []byte {
	format := byte('f')
	if a := math.Abs(x); a != 0 && (a < 1e-6 || a >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, x, format, -1, 64)
	if n := len(b); format == 'e' && n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
		b[n-2] = b[n-1]
		b = b[:n-1]
	}
	return b
}

func integer(x int64) node { return node{kind: jNumber, lit: strconv.FormatInt(x, 10)} }

func boolean(b bool) node { return node{kind: jBool, lit: strconv.FormatBool(b)} }

func floats(l []float64) node { return node{kind: jArray, nums: l} }

func (n node) write(b *bytes.Buffer, indent string, pretty bool) {
	switch n.kind {
	case jObject:
		b.WriteByte('{')
		inner := indent + "  "
		for i, k := range n.keys {
			if i > 0 {
				b.WriteByte(',')
			}
			if pretty {
				b.WriteString("\n" + inner)
			}
			b.WriteString(str(k).lit)
			b.WriteByte(':')
			if pretty {
				b.WriteByte(' ')
			}
			n.vals[i].write(b, inner, pretty)
		}
		if pretty && len(n.keys) > 0 {
			b.WriteString("\n" + indent)
		}
		b.WriteByte('}')
	case jArray:
		if n.list != nil {
			n.writeList(b, indent, pretty)
			return
		}
		b.WriteByte('[')
		var d []byte
		for i, x := range n.nums {
			if i > 0 {
				b.WriteByte(',')
				if pretty {
					b.WriteByte(' ')
				}
			}
			d = appendFloat(d[:0], x)
			b.Write(d)
		}
		b.WriteByte(']')
	default:
		b.WriteString(n.lit)
	}
}

// writeList writes a list of values other than numbers, one a line when pretty.
func (n node) writeList(b *bytes.Buffer, indent string, pretty bool) {
	b.WriteByte('[')
	inner := indent + "  "
	for i, e := range n.list {
		if i > 0 {
			b.WriteByte(',')
		}
		if pretty {
			b.WriteString("\n" + inner)
		}
		e.write(b, inner, pretty)
	}
	if pretty && len(n.list) > 0 {
		b.WriteString("\n" + indent)
	}
	b.WriteByte(']')
}

// Encode writes s in canonical form: keys in a fixed order (kind, version, title, notes,
// design, signal, noise, penalty, study; parameters in registry order), optional values
// left out when absent (notes when empty, study when nil, false log flags, an empty
// solver), two-space indentation with lists on one line, and a final newline. Numbers are
// written as encoding/json writes them, so Decode reads back exactly the same scenario.
// An invalid s gives its *FieldError and no output.
func (s Scenario) Encode() ([]byte, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	return s.pretty(), nil
}

// Encode is Scenario.Encode without checking the scenario again.
func (c Checked) Encode() []byte { return c.s.pretty() }

func (s Scenario) pretty() []byte {
	var b bytes.Buffer
	s.tree().write(&b, "", true)
	b.WriteByte('\n')
	return b.Bytes()
}

// compact is the canonical form without any space: the text inside a share link.
func (s Scenario) compact() []byte {
	var b bytes.Buffer
	s.tree().write(&b, "", false)
	return b.Bytes()
}

// tree is the canonical form of a valid s.
func (s Scenario) tree() node {
	t := obj()
	t.set("kind", str(s.Kind))
	t.set("version", integer(int64(s.Version)))
	t.set("title", str(s.Title))
	if s.Notes != "" {
		t.set("notes", str(s.Notes))
	}
	d := obj()
	d.set("shape", str(s.Design.Shape))
	d.set("alpha", flt(s.Design.Alpha))
	d.set("scale", str(s.Design.Scale))
	addParams(&d, designs(), s.Design.Shape, s.Design.Params, s.Design.Lists)
	t.set("design", d)
	g := obj()
	g.set("law", str(s.Signal.Law))
	addParams(&g, signals(), s.Signal.Law, s.Signal.Params, s.Signal.Lists)
	t.set("signal", g)
	z := obj()
	if s.Noise.SNR {
		z.set("snr_db", flt(s.Noise.SNRdB))
	} else {
		z.set("variance", flt(s.Noise.Variance))
	}
	s.Noise.lawTree(&z)
	t.set("noise", z)
	p := obj()
	p.set("kind", str(s.Penalty.Kind))
	addParams(&p, penalties(), s.Penalty.Kind, s.Penalty.Params, nil)
	t.set("penalty", p)
	s.glmTree(&t)
	if s.Study != nil {
		t.set("study", s.Study.tree())
	}
	return t
}

func addParams(n *node, f *family, kind string, params map[string]float64, lists map[string][]float64) {
	k, _ := f.find(kind)
	for _, p := range k.Params {
		if p.List {
			n.set(p.Name, floats(lists[p.Name]))
		} else {
			n.set(p.Name, flt(params[p.Name]))
		}
	}
}

// axis writes one swept value: its path under the key over, then from, to, points and
// (when set) log, each key led by prefix ("x_from" for a map's x axis).
func (n *node) axis(over, prefix, path string, from, to float64, points int, log bool) {
	n.set(over, str(path))
	n.set(prefix+"from", flt(from))
	n.set(prefix+"to", flt(to))
	n.set(prefix+"points", integer(int64(points)))
	if log {
		n.set(prefix+"log", boolean(true))
	}
}

func (st *Study) tree() node {
	t := obj()
	t.set("view", str(st.View))
	if sw := st.Sweep; sw != nil {
		n := obj()
		n.axis("over", "", sw.Over, sw.From, sw.To, sw.Points, sw.Log)
		if sw.Curves != "" {
			n.set("curves", str(sw.Curves))
			n.set("curves_at", floats(sw.CurvesAt))
		}
		t.set("sweep", n)
	}
	if m := st.Map; m != nil {
		n := obj()
		n.axis("x", "x_", m.X, m.XFrom, m.XTo, m.XPoints, m.XLog)
		n.axis("y", "y_", m.Y, m.YFrom, m.YTo, m.YPoints, m.YLog)
		t.set("map", n)
	}
	if b := st.Best; b != nil {
		n := obj()
		n.set("over", str(b.Over))
		t.set("best", n)
	}
	if p := st.Plan; p != nil {
		n := obj()
		n.set("target_db", flt(p.TargetDB))
		n.set("alpha_max", flt(p.AlphaMax))
		t.set("plan", n)
	}
	if c := st.Check; c != nil {
		n := obj()
		n.set("n", integer(int64(c.N)))
		n.set("trials", integer(int64(c.Trials)))
		n.set("seed", integer(int64(c.Seed)))
		if c.Solver != "" {
			n.set("solver", str(c.Solver))
		}
		t.set("check", n)
	}
	if len(st.Kept) > 0 {
		l := node{kind: jArray, list: []node{}}
		for _, k := range st.Kept {
			n := obj()
			n.set("label", str(k.Label))
			n.set("scenario", k.Scenario.tree())
			n.axis("over", "", k.Sweep.Over, k.Sweep.From, k.Sweep.To, k.Sweep.Points, k.Sweep.Log)
			l.list = append(l.list, n)
		}
		t.set("kept", l)
	}
	return t
}
