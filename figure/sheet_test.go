package figure

import (
	"image"
	"testing"
)

func TestSheetLayout(t *testing.T) {
	g := image.NewGray(image.Rect(0, 0, 20, 10))
	for k := range g.Pix {
		g.Pix[k] = 255
	}
	rows := [][]SheetCell{
		{{Image: g, Lines: []string{"a"}}, {Image: nil, Lines: []string{"failed"}}},
		{{Image: g, Lines: []string{"b", "c"}}},
	}
	img, err := Sheet(rows, []string{"one", "two"}, []string{"r1", "r2"}, 64)
	if err != nil {
		t.Fatal(err)
	}
	b := img.Bounds()
	if b.Dx() < 2*64 || b.Dy() < 2*64 {
		t.Fatalf("sheet %v too small for 2 × 2 cells of 64 px", b)
	}
	if _, err := Sheet(nil, nil, nil, 64); err == nil {
		t.Error("empty sheet: no error")
	}
	if _, err := Sheet(rows, nil, nil, 8); err == nil {
		t.Error("8 px cells: no error")
	}
}
