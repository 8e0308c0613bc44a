package main

import (
	"flag"
	"fmt"
	"io"
	"strings"

	"hdrisk/engine/design"
	"hdrisk/engine/loss"
	"hdrisk/engine/noise"
	"hdrisk/engine/param"
	"hdrisk/engine/penalty"
	"hdrisk/engine/readout"
	"hdrisk/engine/scenario"
	"hdrisk/engine/signal"
)

// runKinds prints what a scenario file may hold, read from the engine's registries: every
// design shape, signal law and penalty kind, and the noise laws, readouts and losses of a
// generalized linear model, with each parameter's unit, range, role and explanation, so
// that a kind added to a registry is listed here without an edit.
func runKinds(args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("kinds", flag.ContinueOnError)
	if pos, err := parseArgs(fs, args); err != nil {
		return err
	} else if len(pos) > 0 {
		return usagef("kinds takes no arguments")
	}
	var b strings.Builder
	section(&b, "design", "shape", []param.Param{scenario.AlphaParam}, nil)
	for _, s := range design.Shapes() {
		kind(&b, s.Name, s.Help, s.Params)
	}
	b.WriteString("  every shape also takes scale: rows, columns or as-given\n")
	section(&b, "signal", "law", nil, nil)
	for _, k := range signal.Laws() {
		kind(&b, k.Name, k.Help, k.Params)
	}
	section(&b, "noise", "", nil, []param.Param{scenario.NoiseParam, scenario.SNRParam})
	section(&b, "penalty", "kind", nil, nil)
	for _, k := range penalty.Kinds() {
		kind(&b, k.Name, k.Help, k.Params)
	}
	b.WriteString("\nA generalized linear model adds any of these groups (left out: the linear model above):\n")
	section(&b, "noise", "law", nil, nil)
	for _, k := range noise.Kinds() {
		kind(&b, k.Name, k.Help, k.Params)
	}
	section(&b, "readout", "kind", nil, nil)
	for _, k := range readout.Kinds() {
		kind(&b, k.Name, k.Help, k.Params)
	}
	section(&b, "loss", "kind", nil, nil)
	for _, k := range loss.Kinds() {
		kind(&b, k.Name, k.Help, k.Params)
	}
	b.WriteString("\nA number is set from the command line with --set OBJECT.NAME=VALUE (eval, best, plan, link);\n")
	b.WriteString("studies name it as sweep --over and best --over do (NAME alone when it is unique).\n")
	_, err := io.WriteString(stdout, b.String())
	return err
}

func section(b *strings.Builder, object, key string, common, oneOf []param.Param) {
	if key != "" {
		fmt.Fprintf(b, "\n%s.%s:\n", object, key)
	} else {
		fmt.Fprintf(b, "\n%s, one of:\n", object)
	}
	for _, p := range common {
		paramLine(b, p, "  every "+key+" takes ")
	}
	for _, p := range oneOf {
		paramLine(b, p, "  ")
	}
}

func kind(b *strings.Builder, name, help string, ps []param.Param) {
	fmt.Fprintf(b, "  %s: %s\n", name, help)
	for _, p := range ps {
		paramLine(b, p, "      ")
	}
}

// paramLine writes "name (unit): range, role[, optional, default d]. help".
func paramLine(b *strings.Builder, p param.Param, indent string) {
	fmt.Fprintf(b, "%s%s", indent, p.Name)
	if p.Unit != "" {
		fmt.Fprintf(b, " (%s)", p.Unit)
	}
	fmt.Fprintf(b, ": %s", p.Range())
	if p.Role != param.Other {
		fmt.Fprintf(b, " [%s]", p.Role)
	}
	if p.Optional {
		fmt.Fprintf(b, ", optional, default %v", p.Default)
	}
	fmt.Fprintf(b, ". %s\n", p.Help)
}
