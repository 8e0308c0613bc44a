package job

import (
	"encoding/json"
	"os"
	"testing"

	"hdrisk/protocol"
)

// FuzzHandle feeds a worker arbitrary request texts: whatever arrives, the worker answers with
// exactly one final reply (a result or an error naming the problem), last, and never panics.
// Requests for the heavy kinds (sweeps, maps, checks) are skipped: their arguments are the
// engine's, fuzzed there, and a valid one may legitimately run for minutes.
func FuzzHandle(f *testing.F) {
	example, err := os.ReadFile("../../testdata/scenarios/sparse-survey.json")
	if err != nil {
		f.Fatal(err)
	}
	f.Add(`{"id":1,"kind":"eval","args":{"scenario":` + string(example) + `}}`)
	f.Add(`{"id":2,"kind":"eval","args":{"scenario":{"kind":"hdrisk.scenario","version":1}}}`)
	f.Add(`{"id":3,"kind":"eval","args":"not an object"}`)
	f.Add(`{"id":4,"kind":"nope"}`)
	f.Add(`{"id":`)
	f.Add(``)
	f.Fuzz(func(t *testing.T, text string) {
		var req protocol.Request
		if json.Unmarshal([]byte(text), &req) == nil && req.Kind != "eval" {
			if _, known := runners[req.Kind]; known {
				t.Skip()
			}
		}
		var replies []protocol.Reply
		Handle(text, "", func(r protocol.Reply) { replies = append(replies, r) })
		if len(replies) == 0 {
			t.Fatal("no reply")
		}
		last := replies[len(replies)-1]
		if last.Type != protocol.Result && last.Type != protocol.Failed {
			t.Fatalf("last reply is %q", last.Type)
		}
		if last.Type == protocol.Failed && last.Error == "" {
			t.Fatal("an error reply says nothing")
		}
		for _, r := range replies[:len(replies)-1] {
			if r.Type != protocol.Progress {
				t.Fatalf("a %q reply before the end", r.Type)
			}
		}
	})
}
