package job

import (
	"encoding/json"
	"errors"
	"strings"
	"testing"

	"hdrisk/protocol"
)

func init() {
	Register("test-count", func(args json.RawMessage, progress func(int, int)) (any, error) {
		var n int
		if err := json.Unmarshal(args, &n); err != nil {
			return nil, errors.New("n: " + err.Error())
		}
		for i := 0; i <= n; i++ {
			progress(i, n)
		}
		return map[string]int{"n": n}, nil
	})
	Register("test-panic", func(json.RawMessage, func(int, int)) (any, error) {
		var m map[string]int
		m["x"] = 1
		return nil, nil
	})
}

func collect(text string) []protocol.Reply {
	var out []protocol.Reply
	Handle(text, func(r protocol.Reply) { out = append(out, r) })
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
