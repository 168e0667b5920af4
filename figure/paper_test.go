package figure

import (
	"bytes"
	"encoding/json"
	"image"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"faultline/internal/pyref"
)

func paperInputs() ([]*image.Gray, []string, Caption, Layout) {
	img := image.NewGray(image.Rect(0, 0, 64, 48))
	for i := range img.Pix {
		img.Pix[i] = uint8(i * 7)
	}
	c := Caption{G: "g = 2 0 0", Lines: []string{"Cu   B = [0 0 1]   s = 0.0100 /nm (w = 0.41)   t = 50 nm   200 kV", "ξg = 41.2 nm   two-beam"}}
	return []*image.Gray{img, img}, []string{"BF", "DF"}, c, Layout{NmPerPx: 0.5, GAngleDeg: 30, Caption: true}
}

// The print PNG is round(W/25.4·D) pixels wide and Pillow (Debian's
// python3-pil) reads its resolution from pHYs as D dots per inch, and the
// text chunks as written.
func TestPaperPNGSizeAndResolution(t *testing.T) {
	pyref.Require(t, "python3-pil", "PIL")
	imgs, labels, c, l := paperInputs()
	dir := t.TempDir()
	for _, p := range []Print{{85, 600}, {170, 300}, {40, 1200}} {
		var buf bytes.Buffer
		if err := EncodePaper(&buf, PaperPNG, imgs, labels, c, l, p, map[string]string{"scene": "{}"}); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, "f.png")
		os.WriteFile(path, buf.Bytes(), 0o644)
		var got struct {
			Size  [2]int
			DPI   [2]float64
			Scene string
		}
		out := pyref.Run(t, nil, `import sys, json
from PIL import Image
im = Image.open(sys.argv[1])
print(json.dumps({"size": im.size, "dpi": im.info["dpi"], "scene": im.info.get("scene")}))`, path)
		if err := json.Unmarshal(out, &got); err != nil {
			t.Fatal(err)
		}
		want := int(math.Round(p.WidthMm / 25.4 * p.DPI))
		// pHYs holds whole pixels per metre: D/0.0254 rounded, read back
		// within 0.02 dpi.
		if got.Size[0] != want || math.Abs(got.DPI[0]-p.DPI) > 0.02 || got.Scene != "{}" {
			t.Errorf("%v: Pillow reads %v px at %v dpi, scene %q; want %d px wide at %g dpi", p, got.Size, got.DPI, got.Scene, want, p.DPI)
		}
	}
}

// PDF and SVG come out at the printed width, with the labels as text
// (vectors), not pixels.
func TestPaperVector(t *testing.T) {
	imgs, labels, c, l := paperInputs()
	p := Print{WidthMm: 85, DPI: 600}
	var pdf, svg bytes.Buffer
	if err := EncodePaper(&pdf, PaperPDF, imgs, labels, c, l, p, nil); err != nil {
		t.Fatal(err)
	}
	if err := EncodePaper(&svg, PaperSVG, imgs, labels, c, l, p, nil); err != nil {
		t.Fatal(err)
	}
	// 85 mm = 85/25.4·72 pt (PDF's unit, ISO 32000-1 §8.3.2.3).
	wantPt := 85 / 25.4 * 72
	m := regexp.MustCompile(`/MediaBox \[0 0 ([0-9.]+) ([0-9.]+)\]`).FindSubmatch(pdf.Bytes())
	if !bytes.HasPrefix(pdf.Bytes(), []byte("%PDF-")) || m == nil {
		t.Fatalf("no PDF page box")
	}
	if w, _ := strconv.ParseFloat(string(m[1]), 64); math.Abs(w-wantPt) > 0.01 {
		t.Errorf("PDF page %s pt wide, want %.2f", m[1], wantPt)
	}
	if !bytes.Contains(pdf.Bytes(), []byte("/FontFile2")) || !bytes.Contains(pdf.Bytes(), []byte("/Subtype /Image")) {
		t.Error("PDF lacks the embedded font or the images")
	}
	s := svg.String()
	for _, want := range []string{">BF<", ">DF<", ">g<", "10 nm<", "<image"} {
		if !strings.Contains(s, want) {
			t.Errorf("SVG lacks %q", want)
		}
	}
	if m := regexp.MustCompile(`<svg[^>]*width="([0-9.]+)pt"`).FindStringSubmatch(s); m == nil {
		t.Error("SVG has no width in pt")
	} else if w, _ := strconv.ParseFloat(m[1], 64); math.Abs(w-wantPt) > 0.01 {
		t.Errorf("SVG %s pt wide, want %.2f", m[1], wantPt)
	}
	if err := EncodePaper(&svg, "eps", imgs, labels, c, l, p, nil); err == nil {
		t.Error("format eps accepted")
	}
	if err := EncodePaper(&svg, PaperPNG, imgs, labels, c, l, Print{WidthMm: 85, DPI: 5000}, nil); err == nil {
		t.Error("5000 dpi accepted")
	}
}

// A plot drawn as PDF and SVG by EncodeVector has the asked size in
// points and its labels as text.
func TestPlotEncodeVector(t *testing.T) {
	pl := Plot{Title: "Rocking curve", XLabel: "s (1/nm)", YLabel: "intensity", Y: YUnit,
		Series: []Series{{Name: "BF", X: []float64{0, 1, 2}, Y: []float64{0.2, 0.5, 0.3}}}}
	var pdf, svg bytes.Buffer
	if err := pl.EncodeVector(&pdf, PaperPDF, 432, 288); err != nil {
		t.Fatal(err)
	}
	if err := pl.EncodeVector(&svg, PaperSVG, 432, 288); err != nil {
		t.Fatal(err)
	}
	if m := regexp.MustCompile(`/MediaBox \[0 0 ([0-9.]+) ([0-9.]+)\]`).FindSubmatch(pdf.Bytes()); m == nil || string(m[1]) != "432.00" && string(m[1]) != "432" {
		t.Errorf("PDF page box %q, want 432 pt wide", m)
	}
	if !strings.Contains(svg.String(), "Rocking curve") || !strings.Contains(svg.String(), `width="432pt"`) {
		t.Error("SVG lacks its title or its width")
	}
	if err := pl.EncodeVector(&svg, "png", 432, 288); err == nil {
		t.Error("format png accepted by EncodeVector")
	}
}
