// Package tests holds end-to-end checks of Faultline against published
// results and the rules practitioners use: a scene goes in through the
// scene package, as it would from a file, and images come out of sim.
package tests

import (
	"context"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// setup parses and builds a scene given as JSON text.
func setup(t testing.TB, text string) *scene.Setup {
	t.Helper()
	sc, err := scene.Parse([]byte(text))
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatalf("build: %v", err)
	}
	return st
}

// render renders a setup's problem.
func render(t testing.TB, st *scene.Setup) *sim.Image {
	t.Helper()
	im, err := sim.Render(context.Background(), st.Problem, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return im
}

// perfect returns the exit intensities of the same foil without defects.
func perfect(st *scene.Setup) []float64 {
	p := *st.Problem
	p.Field = nil
	return p.Column(0, 0)
}

// mustMarshal returns the scene of a setup as JSON text.
func mustMarshal(t testing.TB, st *scene.Setup) string {
	t.Helper()
	data, err := scene.Marshal(st.Scene)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}
