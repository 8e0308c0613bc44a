package main

import (
	"flag"
	"io"

	"hdrisk/engine/scenario"
)

// runOpen prints the scenario held by a share link (a whole address, "#s1.…" or "s1.…";
// "-" reads it from standard input) in the canonical form of a scenario file.
func runOpen(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("open", flag.ContinueOnError)
	link, err := onePositional(fs, args, "link")
	if err != nil {
		return err
	}
	if link == "-" {
		b, err := readLimited("-", stdin, scenario.MaxLinkInput)
		if err != nil {
			return err
		}
		link = string(b)
	}
	s, err := scenario.DecodeLink(link)
	if err != nil {
		return err
	}
	b, err := s.Encode()
	if err != nil {
		return err
	}
	_, err = stdout.Write(b)
	return err
}
