package job

import (
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"hdrisk/protocol"
)

func init() {
	Register("test-count", func(args json.RawMessage, _ string, progress func(int, int)) (any, error) {
		var n int
		if err := json.Unmarshal(args, &n); err != nil {
			return nil, errors.New("n: " + err.Error())
		}
		for i := 0; i <= n; i++ {
			progress(i, n)
		}
		return map[string]int{"n": n}, nil
	})
	Register("test-panic", func(json.RawMessage, string, func(int, int)) (any, error) {
		var m map[string]int
		m["x"] = 1
		return nil, nil
	})
}

func collect(text string) []protocol.Reply {
	var out []protocol.Reply
	Handle(text, "", func(r protocol.Reply) { out = append(out, r) })
	return out
}

func TestRunEndsWithOneResult(t *testing.T) {
	replies := collect(`{"id":7,"kind":"test-count","args":1000}`)
	last := replies[len(replies)-1]
	if last.Type != protocol.Result || last.ID != 7 || string(last.Result) != `{"n":1000}` {
		t.Fatalf("last reply = %+v, want the result of job 7", last)
	}
	// protocol.Progress is thinned to one reply per 50 ms, but the final step always goes out.
	if len(replies) > 10 {
		t.Errorf("%d replies for a job of a few microseconds; progress is not thinned", len(replies))
	}
	prev := replies[len(replies)-2]
	if prev.Type != protocol.Progress || prev.Done != 1000 || prev.Total != 1000 {
		t.Errorf("reply before the result = %+v, want progress 1000/1000", prev)
	}
}

func TestRunErrors(t *testing.T) {
	cases := []struct{ text, want string }{
		{`{"id":1,"kind":"no-such-kind"}`, `unknown job kind "no-such-kind"`},
		{`not json`, "request:"},
		{`{"id":2,"kind":"test-count","args":"x"}`, "n:"},
		{`{"id":3,"kind":"test-panic"}`, "internal error"},
		{`{"id":4,"kind":"eval","args":{}}`, "scenario: missing"},
		{`{"id":5,"kind":"eval","args":{"scenario":{"kind":"hdrisk.scenario","version":1,"title":"invented",` +
			`"design":{"shape":"orthogonal","alpha":0.4,"scale":"rows"},"signal":{"law":"gauss","variance":1},` +
			`"noise":{"variance":0.01},"penalty":{"kind":"l1","l1":-1}}}}`, "penalty.l1"},
	}
	for _, c := range cases {
		replies := collect(c.text)
		if len(replies) != 1 || replies[0].Type != protocol.Failed || !strings.Contains(replies[0].Error, c.want) {
			t.Errorf("%s: replies %+v, want one error containing %q", c.text, replies, c.want)
		}
	}
}

func TestKindsListsEval(t *testing.T) {
	found := false
	for _, k := range Kinds() {
		found = found || k == "eval"
	}
	if !found {
		t.Errorf("Kinds() = %v, has no eval", Kinds())
	}
}

// A file's text sent beside the request (protocol.Bulky) gives the same result as the same
// text inside the arguments, for each kind that reads a file; the JSON part alone is refused
// as an empty file.
func TestBulkBesideTheRequest(t *testing.T) {
	for _, c := range []struct {
		kind string
		args protocol.Bulky
		text string
	}{
		{"spectrum", protocol.SpectrumArgs{Source: protocol.SourceMatrix}, "1,2,0\n3,4,1\n"},
		{"fit", protocol.FitArgs{Method: protocol.FitNone}, "0.5\n-1\n0\n2\n0\n"},
	} {
		inside, _ := json.Marshal(withBulk(c.args, c.text))
		beside, _ := json.Marshal(c.args.WithoutBulk())
		run := func(args []byte, bulk string) protocol.Reply {
			var last protocol.Reply
			Handle(`{"id":1,"kind":"`+c.kind+`","args":`+string(args)+`}`, bulk, func(r protocol.Reply) { last = r })
			return last
		}
		a, b := run(inside, ""), run(beside, c.text)
		if a.Type != protocol.Result || b.Type != protocol.Result {
			t.Fatalf("%s: inside %+v, beside %+v", c.kind, a, b)
		}
		// The results name their read time; compare everything else.
		if strip(a.Result) != strip(b.Result) {
			t.Errorf("%s: beside the request gave %s, inside %s", c.kind, b.Result, a.Result)
		}
		if r := run(beside, ""); r.Type != protocol.Failed {
			t.Errorf("%s: the arguments without their text gave %+v, want a refusal", c.kind, r)
		}
	}
}

func withBulk(a protocol.Bulky, text string) any {
	switch v := a.(type) {
	case protocol.SpectrumArgs:
		v.SetBulk(text)
		return v
	case protocol.FitArgs:
		v.SetBulk(text)
		return v
	}
	panic("withBulk: unknown arguments")
}

// strip removes the fields that hold seconds from a JSON result.
func strip(b []byte) string {
	var m map[string]any
	if json.Unmarshal(b, &m) != nil {
		return string(b)
	}
	for k := range m {
		if strings.HasSuffix(k, "seconds") {
			delete(m, k)
		}
	}
	out, _ := json.Marshal(m)
	return string(out)
}
