package main

import (
	"flag"
	"fmt"

	"faultline/export"
	"faultline/figure"
)

// printOptions turns --figure-width-mm, --dpi and --figure-format into the
// print figure of o: any of them asks for it, and the others take their
// defaults (one journal column, 85 mm, at 600 dpi).
func printOptions(fs *flag.FlagSet, o *export.Options, widthMm, dpi float64, format string) error {
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	if !set["figure-width-mm"] && !set["dpi"] && !set["figure-format"] {
		return nil
	}
	switch format {
	case "", figure.PaperPNG, figure.PaperPDF, figure.PaperSVG:
	default:
		return usageError{fmt.Sprintf("--figure-format %s: the formats are pdf and svg (figure.png is always written)", format)}
	}
	p := figure.Print{WidthMm: figure.DefaultWidthMm, DPI: figure.DefaultDPI}
	if set["figure-width-mm"] {
		p.WidthMm = widthMm
	}
	if set["dpi"] {
		p.DPI = dpi
	}
	if !(p.WidthMm >= 20 && p.WidthMm <= 500) {
		return usageError{fmt.Sprintf("--figure-width-mm %g: want 20 to 500", p.WidthMm)}
	}
	if !(p.DPI >= 72 && p.DPI <= 2400) {
		return usageError{fmt.Sprintf("--dpi %g: want 72 to 2400", p.DPI)}
	}
	if err := p.Validate(); err != nil {
		return usageError{"--figure-width-mm, --dpi: " + err.Error()}
	}
	o.Print, o.FigureFormat = &p, format
	return nil
}
