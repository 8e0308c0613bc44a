package main

import (
	"flag"
	"io"

	"hdrisk/engine/scenario"
)

// runLink prints the share code of a scenario file.
func runLink(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("link", flag.ContinueOnError)
	s, err := scenarioArg(fs, args, stdin)
	if err != nil {
		return err
	}
	code, err := scenario.EncodeLink(s)
	if err != nil {
		return err
	}
	_, err = io.WriteString(stdout, code+"\n")
	return err
}
