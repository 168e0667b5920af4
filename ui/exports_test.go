package ui

import (
	"bufio"
	"bytes"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"faultline/export"
	"faultline/figure"
	"faultline/scene"
)

// The exports write what the current full render holds: a PNG figure at
// the chosen scale carrying the scene, float TIFFs with the intensities,
// and the profile CSV.
func TestExports(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	dir := t.TempDir()
	_, im, err := ws.currentFull()
	if err != nil {
		t.Fatal(err)
	}
	nx := im.Grid.NX

	for _, c := range []struct {
		panels  string
		scale   int
		caption bool
		n       int // images side by side
	}{{figPair, 2, true, 2}, {figBF, 3, false, 1}, {figDF, 2, true, 1}} {
		path := filepath.Join(dir, strings.ReplaceAll(c.panels, " ", "_")+".png")
		o := FigureOptions{Panels: c.panels, Scale: c.scale, Caption: c.caption, Mapping: ws.view.mapping}
		if err := ws.ExportFigure(path, o); err != nil {
			t.Fatalf("%s: %v", c.panels, err)
		}
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		cfg, err := png.DecodeConfig(f)
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", c.panels, err)
		}
		if min := c.n * c.scale * nx; cfg.Width < min {
			t.Errorf("%s ×%d: %d px wide, want at least %d (the panels alone)", c.panels, c.scale, cfg.Width, min)
		}
		text, err := figure.ReadPNGText(path)
		if err != nil {
			t.Fatal(err)
		}
		sc, err := scene.Parse([]byte(text[export.KeyScene]))
		if err != nil {
			t.Errorf("%s: scene in the PNG does not parse: %v", c.panels, err)
		} else if sc.Foil.ThicknessNm != ws.ctrl.Scene().Foil.ThicknessNm {
			t.Errorf("%s: the PNG carries another scene", c.panels)
		}
	}

	out, err := ws.ExportTIFF(dir)
	if err != nil {
		t.Fatal(err)
	}
	// The names the command line writes.
	if len(out) != 2 || out[0] != filepath.Join(dir, "bf.tiff") || out[1] != filepath.Join(dir, "df.tiff") {
		t.Errorf("TIFFs written as %v, want bf.tiff and df.tiff in %s", out, dir)
	}
	for k, p := range out {
		f, err := os.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		data, w, h, err := figure.ReadFloatTIFF(f)
		f.Close()
		if err != nil || w != nx || h != im.Grid.NY {
			t.Fatalf("%s: %d × %d, %v", p, w, h, err)
		}
		plane := im.Intensity[k]
		for i := range data {
			if float64(data[i]) != float64(float32(plane[i])) {
				t.Fatalf("%s: value %d = %g, want %g", p, i, data[i], plane[i])
			}
		}
	}

	// Profile along the default line across the middle.
	csv := filepath.Join(dir, "p.csv")
	if err := ws.ExportProfile(csv); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(csv)
	sc := bufio.NewScanner(bytes.NewReader(b))
	sc.Scan()
	if sc.Text() != "distance_nm,x_nm,y_nm,bf,df" {
		t.Errorf("profile header %q", sc.Text())
	}
	rows := 0
	for sc.Scan() {
		if strings.Count(sc.Text(), ",") != 4 {
			t.Fatalf("profile row %q", sc.Text())
		}
		rows++
	}
	if rows < nx {
		t.Errorf("%d profile rows across %d pixels, want about two per pixel", rows, nx)
	}
	// With no line, the centre row, as the command line writes it.
	ws.view.autoLine = false
	ws.view.setLine(profileLine{}, true)
	if err := ws.ExportProfile(csv); err != nil {
		t.Fatal(err)
	}
	b, _ = os.ReadFile(csv)
	var want bytes.Buffer
	export.WriteProfile(&want, im, 0)
	if !bytes.Equal(b, want.Bytes()) {
		t.Error("profile without a line differs from export.WriteProfile of the centre row")
	}
}

// Exports wait for the full render of the scene as it is now.
func TestExportRefusesStaleRender(t *testing.T) {
	fr := &fakeRender{}
	ws, _ := newTestWorkspace(t, fr.render)
	fr.hold()
	ws.params.Thickness.Slider.SetValue(90)
	if err := ws.ExportFigure(filepath.Join(t.TempDir(), "x.png"), FigureOptions{}); err == nil {
		t.Error("exported a figure of a scene whose render has not finished")
	}
	ws.ctrl.Close()
}
