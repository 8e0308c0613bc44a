package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"hdrisk/engine/plot"
)

// figureFlags declares the flags every study command draws its figure with; the page's
// views draw the same figures (engine/plot's SweepFigure and MapFigure).
type figureFlags struct {
	path     *string
	quantity *string
	width    *float64
	height   *float64
}

func addFigureFlags(fs *flag.FlagSet) figureFlags {
	return figureFlags{
		path:     fs.String("figure", "", "also draw the figure into this file: .svg, .png (at 2x) or .pdf"),
		quantity: fs.String("quantity", "nmse_db", "what the figure shows (mse, nmse, nmse_db, susceptibility, ...)"),
		width:    fs.Float64("width", 0, "figure width in points (0: 480)"),
		height:   fs.Float64("height", 0, "figure height in points (0: 300)"),
	}
}

// check refuses a figure file of an unknown kind and an unknown quantity before any work.
func (ff figureFlags) check() error {
	if *ff.path != "" {
		if _, err := figureFormat(*ff.path); err != nil {
			return err
		}
	}
	if plot.Observable(*ff.quantity).Name != *ff.quantity {
		var names []string
		for _, o := range plot.Quantities() {
			names = append(names, o.Name)
		}
		return usagef("--quantity: %q is not one of %s", *ff.quantity, strings.Join(names, ", "))
	}
	return nil
}

func figureFormat(path string) (string, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".svg", ".png", ".pdf":
		return ext[1:], nil
	default:
		return "", usagef("--figure: %q is not a .svg, .png or .pdf file", path)
	}
}

// write renders f into the figure file in the format its name ends with.
func (ff figureFlags) write(f *plot.Figure) error {
	format, err := figureFormat(*ff.path)
	if err != nil {
		return err
	}
	var data []byte
	switch format {
	case "svg":
		data, err = f.SVG()
	case "png":
		data, err = pngOf(f)
	case "pdf":
		data, err = f.PDF()
	}
	if err != nil {
		return fmt.Errorf("--figure %s: %w", *ff.path, err)
	}
	if err := os.WriteFile(*ff.path, data, 0o644); err != nil {
		return fmt.Errorf("--figure: %w", err)
	}
	return nil
}
