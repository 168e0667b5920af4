package ui

import (
	"go/parser"
	"go/token"
	"path/filepath"
	"strconv"
	"testing"
)

// The window decodes no image file itself and does no crystallography:
// micrographs come decoded from the micrograph package, pictures from
// assets and figure, and every derived physical value from scene. (Fyne's
// own canvas imports image/png and image/jpeg for its resources, and scene
// is built on crystal, so this checks ui's own imports, not everything it
// links.)
func TestNoImageDecoderInUI(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	banned := map[string]bool{"image/png": true, "image/jpeg": true, "image/gif": true, "golang.org/x/image/tiff": true, "golang.org/x/image/bmp": true, "faultline/crystal": true}
	fs := token.NewFileSet()
	for _, f := range files {
		af, err := parser.ParseFile(fs, f, nil, parser.ImportsOnly)
		if err != nil {
			t.Fatal(err)
		}
		for _, im := range af.Imports {
			p, _ := strconv.Unquote(im.Path.Value)
			if banned[p] && !isTestFile(f) {
				t.Errorf("%s imports %s: decode in the micrograph package, derive in scene, instead", f, p)
			}
		}
	}
}

func isTestFile(name string) bool { return len(name) > 8 && name[len(name)-8:] == "_test.go" }
