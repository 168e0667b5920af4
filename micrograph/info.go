package micrograph

import (
	"fmt"
	"io"
	"math"
	"strings"
)

// Info is what a file holds, for a user to check: what `faultline
// inspect` prints.
type Info struct {
	Width         int      `json:"width"`
	Height        int      `json:"height"`
	NmPerPx       *float64 `json:"nm_per_px"` // null when the file records none
	PixelSizeFrom string   `json:"pixel_size_from,omitempty"`
	Format        string   `json:"format"`
	Kind          string   `json:"kind"`
	Min           float64  `json:"min"`
	Max           float64  `json:"max"`
	Mean          float64  `json:"mean"`
	Metadata      Metadata `json:"metadata"`
	Notices       []string `json:"notices,omitempty"`
}

// Info summarises the image: size, pixel size, format, the range of its
// finite values and the metadata.
func (m *Image) Info() Info {
	in := Info{Width: m.Width, Height: m.Height, Format: m.Format, Kind: m.Kind,
		PixelSizeFrom: m.PixelSizeFrom, Metadata: m.Meta, Notices: m.Notices}
	if m.NmPerPx > 0 {
		v := m.NmPerPx
		in.NmPerPx = &v
	}
	lo, hi, sum, n := math.Inf(1), math.Inf(-1), 0.0, 0
	for _, v := range m.Pix {
		x := float64(v)
		if math.IsNaN(x) || math.IsInf(x, 0) {
			continue
		}
		lo, hi, sum, n = min(lo, x), max(hi, x), sum+x, n+1
	}
	if n > 0 {
		in.Min, in.Max, in.Mean = lo, hi, sum/float64(n)
	}
	return in
}

// WriteText writes the summary as lines a person reads.
func (in Info) WriteText(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "format       %s, %s\n", strings.ToUpper(in.Format), in.Kind)
	fmt.Fprintf(&b, "size         %d × %d pixels\n", in.Width, in.Height)
	if in.NmPerPx != nil {
		fmt.Fprintf(&b, "pixel size   %.6g nm (from the %s)\n", *in.NmPerPx, in.PixelSizeFrom)
	} else {
		fmt.Fprintf(&b, "pixel size   not recorded: give it with --nm-per-px or in the window\n")
	}
	fmt.Fprintf(&b, "values       %.6g to %.6g, mean %.6g\n", in.Min, in.Max, in.Mean)
	md := in.Metadata
	if md.VoltageKV > 0 {
		fmt.Fprintf(&b, "voltage      %g kV\n", md.VoltageKV)
	}
	if md.Magnification > 0 {
		fmt.Fprintf(&b, "magnification %g×\n", md.Magnification)
	}
	if md.CameraLengthMm > 0 {
		fmt.Fprintf(&b, "camera length %g mm\n", md.CameraLengthMm)
	}
	if md.Date != "" {
		fmt.Fprintf(&b, "acquired     %s\n", md.Date)
	}
	if md.StackSize > 1 {
		fmt.Fprintf(&b, "stack        image #%d of %d\n", md.StackIndex, md.StackSize)
	}
	if len(md.OriginNm) == 2 {
		fmt.Fprintf(&b, "origin       (%.6g, %.6g) nm\n", md.OriginNm[0], md.OriginNm[1])
	}
	if md.Description != "" {
		d := md.Description
		if len(d) > 200 {
			d = d[:200] + "…"
		}
		fmt.Fprintf(&b, "description  %s\n", strings.Join(strings.Fields(d), " "))
	}
	for _, n := range in.Notices {
		fmt.Fprintf(&b, "note         %s\n", n)
	}
	_, err := io.WriteString(w, b.String())
	return err
}
