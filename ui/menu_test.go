package ui

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/widget"
)

// The Edit menu offers Undo (Ctrl+Z) and Redo (Ctrl+Shift+Z); Help has the
// page about the models, which covers each model, the conventions and the
// cautions.
func TestMenusAndAboutPage(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	menus := map[string]*fyne.Menu{}
	for _, m := range ws.mainMenu().Items {
		menus[m.Label] = m
	}
	edit := menus["Edit"]
	if edit == nil || len(edit.Items) != 2 {
		t.Fatalf("Edit menu %+v", edit)
	}
	for k, want := range []string{"Ctrl+Z", "Ctrl+Shift+Z"} {
		it := edit.Items[k]
		if it.Shortcut == nil {
			t.Fatalf("%s has no shortcut", it.Label)
		}
		if got := shortcutText(ws.commands()[strings.ToLower(it.Label)].key); got != want {
			t.Errorf("%s: %s, want %s", it.Label, got, want)
		}
	}
	found := false
	for _, it := range menus["Help"].Items {
		found = found || it.Label == "About the models"
	}
	if !found {
		t.Error("Help has no \"About the models\"")
	}
	rt := widget.NewRichTextFromMarkdown(aboutModels)
	var heads []string
	for _, s := range rt.Segments {
		if ts, ok := s.(*widget.TextSegment); ok && strings.Contains(strings.ToLower(string(ts.Style.SizeName)), "heading") {
			heads = append(heads, ts.Text)
		}
	}
	if strings.Join(heads, "|") != "About the models|Kinematical|Two-beam|Systematic row|Conventions|Cautions" {
		t.Errorf("headings %q", heads)
	}
}
