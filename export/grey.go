package export

import (
	"fmt"
	"math"
	"strings"

	"faultline/figure"
	"faultline/sim"
)

// StretchNote says how one panel's grey relates to intensity under a
// stretch: the range mapped to black and white ("BF stretched over
// 0.412–0.587"), or, for a panel without contrast, that it is drawn flat
// and why ("BF: no contrast (range 2.2e-16, below 0.001 of the incident
// beam), drawn flat at 0.982"). A fixed mapping gives "".
func StretchNote(label string, s figure.Stretch) string {
	if !s.Auto {
		return ""
	}
	if s.Flat {
		return fmt.Sprintf("%s: no contrast (range %.2g, below %g of the incident beam), drawn flat at %s",
			label, s.Span, figure.ContrastFloor, fixedDecimals(s.Level, 3))
	}
	return label + " stretched over " + StretchRange(s)
}

// StretchRange writes the range a stretched panel maps, with two
// significant digits of its width: "0.412–0.587".
func StretchRange(s figure.Stretch) string {
	d := rangeDecimals(s.Hi - s.Lo)
	return fixedDecimals(s.Lo, d) + "–" + fixedDecimals(s.Hi, d)
}

// rangeDecimals is the number of decimals that show a range of width w
// with two significant digits, at least three.
func rangeDecimals(w float64) int {
	if !(w > 0) {
		return 3
	}
	return min(8, max(3, 1-int(math.Floor(math.Log10(w)))))
}

// fixedDecimals writes v with d decimals, never "-0.000".
func fixedDecimals(v float64, d int) string {
	s := fmt.Sprintf("%.*f", d, v)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// GreyNote is the caption line that says how the grey of the panels
// labelled labels (beams n of im: 0 bright field, 1 dark field) relates to
// intensity under m: the range each stretched panel maps, or that a panel
// has no contrast, and the clipping and inversion.
func GreyNote(im *sim.Image, m figure.Mapping, beams []int, labels []string) string {
	if m.Mode != figure.ModeAuto {
		return MappingNote(m)
	}
	stretches := make([]figure.Stretch, len(beams))
	for k, n := range beams {
		stretches[k] = m.Stretch(im.Beam(n))
	}
	return greyNote(m, stretches, labels)
}

func greyNote(m figure.Mapping, stretches []figure.Stretch, labels []string) string {
	parts := make([]string, len(stretches))
	for k, s := range stretches {
		parts[k] = StretchNote(labels[k], s)
	}
	var tail []string
	if m.ClipPercent > 0 {
		tail = append(tail, fmt.Sprintf("%g %% of the pixels clipped at each end", m.ClipPercent))
	}
	if m.Invert {
		tail = append(tail, "inverted")
	}
	note := "grey: " + strings.Join(parts, "; ")
	if len(tail) > 0 {
		note += " (" + strings.Join(tail, ", ") + ")"
	}
	return note
}

// longestGreyNote is a grey line at least as long as any GreyNote of two
// panels under m, for sizing a figure before its images exist.
func longestGreyNote(m figure.Mapping) string {
	if m.Mode != figure.ModeAuto {
		return MappingNote(m)
	}
	flat := figure.Stretch{Auto: true, Flat: true, Span: -1.2345e-16, Level: 0.123}
	return greyNote(m, []figure.Stretch{flat, flat}, []string{"BF", "DF"})
}
