package ui

import (
	"context"
	"sort"
	"testing"
	"time"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

// moveInclusion moves the demo scene's precipitate (defects[1]) to x = x
// nm: a change of the field, which the window shows as a preview first.
func moveInclusion(x float64) func(sc *scene.Scene) {
	return func(sc *scene.Scene) { sc.Defects[1].AtNm[0] = x }
}

// moveLatencies moves the precipitate of the demo scene k times as a
// slider would and returns, for each move, the time from the change to the
// preview being handed to the UI goroutine, and the full render times.
func moveLatencies(t testing.TB, k int) (preview, full []time.Duration) {
	p := newPump()
	c := NewController(p.post)
	var last *Result
	c.OnResult(func(r *Result) { last = r })
	c.Replace(demoScene(t), "", true)
	wait := func(wantPreview bool) *Result {
		deadline := time.After(60 * time.Second)
		for {
			select {
			case f := <-p.ch:
				f()
				if last != nil && last.Gen == c.Gen() && last.Preview == wantPreview {
					r := last
					return r
				}
			case <-deadline:
				t.Fatalf("no result within 60 s")
			}
		}
	}
	wait(false)
	for i := 0; i < k; i++ {
		t0 := time.Now()
		if err := c.Edit(moveInclusion(-89.5 + float64(i%20))); err != nil {
			t.Fatal(err)
		}
		r := wait(true)
		preview = append(preview, time.Since(t0))
		_ = r
		f := wait(false)
		full = append(full, f.Elapsed)
	}
	c.Close()
	return preview, full
}

func median(d []time.Duration) time.Duration {
	s := append([]time.Duration(nil), d...)
	sort.Slice(s, func(i, j int) bool { return s[i] < s[j] })
	return s[len(s)/2]
}

// BenchmarkPreviewAfterSliderMove reports the time from a change of the
// demo scene's field (its precipitate moved) to its preview reaching the
// UI goroutine (preview-ms) and the full render time (full-ms).
func BenchmarkPreviewAfterSliderMove(b *testing.B) {
	pv, full := moveLatencies(b, b.N)
	var sp, sf time.Duration
	for i := range pv {
		sp += pv[i]
		sf += full[i]
	}
	b.ReportMetric(float64(sp.Microseconds())/1000/float64(len(pv)), "preview-ms")
	b.ReportMetric(float64(median(pv).Microseconds())/1000, "preview-median-ms")
	b.ReportMetric(float64(sf.Microseconds())/1000/float64(len(full)), "full-ms")
}

// BenchmarkPreviewDuringDrag moves the demo scene's precipitate every 16 ms
// (a slider dragged without pause at 60 events a second) for a second and
// reports how often a preview reached the UI goroutine (interval-ms) and
// how old the change it showed was by then (age-ms).
func BenchmarkPreviewDuringDrag(b *testing.B) {
	var ages, gaps []time.Duration
	for i := 0; i < b.N; i++ {
		p := newPump()
		c := NewController(p.post)
		var shownAt []time.Time
		var shown []*Result
		c.OnResult(func(r *Result) {
			if r.Preview {
				shown = append(shown, r)
				shownAt = append(shownAt, time.Now())
			}
		})
		c.Replace(demoScene(b), "", true)
		p.until(b, 60*time.Second, "first full render", func() bool { return c.LastFull() != nil })
		shown, shownAt = nil, nil
		changed := map[uint64]time.Time{}
		for k := 0; k < 60; k++ {
			c.Edit(moveInclusion(-89.75 + 0.5*float64(k)))
			changed[c.Gen()] = time.Now()
			p.drain(16 * time.Millisecond)
		}
		last := c.Gen()
		p.until(b, 60*time.Second, "preview of the last move", func() bool { return c.Last() != nil && c.Last().Gen == last })
		for k, r := range shown {
			ages = append(ages, shownAt[k].Sub(changed[r.Gen]))
			if k > 0 {
				gaps = append(gaps, shownAt[k].Sub(shownAt[k-1]))
			}
		}
		c.Close()
	}
	b.ReportMetric(float64(median(ages).Microseconds())/1000, "age-ms")
	b.ReportMetric(float64(median(gaps).Microseconds())/1000, "interval-ms")
}

// slider is what sliderLatencies measured.
type slider struct {
	lat         []time.Duration // from each change to its full image
	first, last *Result         // the full images of the first and last moves
	cold        time.Duration   // the first full render
	build       time.Duration   // the s table's build, when one was awaited
}

// sliderLatencies renders the demo scene at 256² and then makes k changes
// with edit (an s or thickness slider move), measuring for each the time
// from the change to its full-resolution image reaching the UI goroutine.
// With waitTable it waits, after the first move, for the s table that move
// starts building (see Controller.STable), so that the later moves are
// served from it.
func sliderLatencies(t testing.TB, k int, edit func(i int) func(sc *scene.Scene), waitTable bool) slider {
	p := newPump()
	c := NewController(p.post)
	var got []*Result
	c.OnResult(func(r *Result) { got = append(got, r) })
	sc := demoScene(t)
	sc.Image.Pixels = []int{256, 256}
	c.Replace(sc, "", true)
	p.until(t, 120*time.Second, "first full render", func() bool { return c.LastFull() != nil })
	out := slider{cold: c.LastFull().Elapsed}
	for i := 0; i < k; i++ {
		got = nil
		t0 := time.Now()
		if err := c.Edit(edit(i)); err != nil {
			t.Fatal(err)
		}
		p.until(t, 120*time.Second, "full image after a slider move", func() bool {
			return c.LastFull() != nil && c.LastFull().Gen == c.Gen()
		})
		out.lat = append(out.lat, time.Since(t0))
		for _, r := range got {
			if r.Preview {
				t.Fatalf("move %d: a preview was shown before the full image", i)
			}
		}
		if i == 0 {
			out.first = c.LastFull()
			if waitTable {
				p.until(t, 300*time.Second, "the s table", func() bool { _, building, _ := c.STable(); return !building })
				tab, _, err := c.STable()
				if tab == nil {
					t.Fatalf("no s table after an s move: %v", err)
				}
				out.build = c.STableBuildTime()
			}
		}
	}
	out.last = c.LastFull()
	c.Close()
	return out
}

func moveS(i int) func(sc *scene.Scene) {
	s := 0.004 + 0.0005*float64(i%10)
	return func(sc *scene.Scene) { sc.Diffraction.SPerNm = &s }
}

func moveThickness(i int) func(sc *scene.Scene) {
	return func(sc *scene.Scene) { sc.Foil.ThicknessNm = 120 - float64(i%20) }
}

// After an s or thickness slider move the demo scene's 256² image is shown
// at full resolution with no preview first: the first move replayed from
// the field samples of the previous full render, later moves of s alone
// evaluated from the s table that move built (TestSTableAgreesWithReplay
// in tests checks the table over many s), later thickness moves replayed.
// Both the first and the last image are those a fresh render gives, within
// 1e-4 of the incident beam.
func TestSliderMovesShowFullImage(t *testing.T) {
	for _, c := range []struct {
		name     string
		edit     func(int) func(*scene.Scene)
		lastFrom string
	}{{"s", moveS, SourceTable}, {"thickness", moveThickness, SourceReplay}} {
		m := sliderLatencies(t, 3, c.edit, c.lastFrom == SourceTable)
		t.Logf("%s: full image %v after a move (median of %d); first move %v; cold render %v; s table built in %v",
			c.name, median(m.lat), len(m.lat), m.lat[0], m.cold, m.build)
		if m.first.Source != SourceReplay {
			t.Errorf("%s: first move's image from %q, want %q", c.name, m.first.Source, SourceReplay)
		}
		if m.last.Source != c.lastFrom {
			t.Errorf("%s: last move's image from %q, want %q", c.name, m.last.Source, c.lastFrom)
		}
		for _, r := range []*Result{m.first, m.last} {
			g := r.Image.Grid
			if g.NX != 256 || g.NY != 256 {
				t.Fatalf("%s: image %d×%d, want 256²", c.name, g.NX, g.NY)
			}
			want, err := export.Render(context.Background(), r.Setup, sim.Options{})
			if err != nil {
				t.Fatal(err)
			}
			worst := sim.MaxDifference(want, r.Image)
			t.Logf("%s: image from %s within %.2g of a fresh render", c.name, r.Source, worst)
			if worst > 1e-4 {
				t.Errorf("%s: the image from %s differs from a fresh render by %.3g", c.name, r.Source, worst)
			}
		}
	}
}

// BenchmarkFullAfterSMove and BenchmarkFullAfterThicknessMove report the
// time from an s (thickness) slider move on the demo scene at 256² to its
// full-resolution image reaching the UI goroutine (full-ms, median over
// the moves), the first move's (first-ms, a replay), and the cold render
// of the scene (cold-ms). After the first s move the benchmark waits for
// the s table it starts (table-build-s, wall), so the later s moves are
// served from the table.
func BenchmarkFullAfterSMove(b *testing.B)         { benchSlider(b, moveS, true) }
func BenchmarkFullAfterThicknessMove(b *testing.B) { benchSlider(b, moveThickness, false) }

func benchSlider(b *testing.B, edit func(int) func(*scene.Scene), waitTable bool) {
	m := sliderLatencies(b, max(b.N, 5), edit, waitTable)
	b.ReportMetric(float64(median(m.lat).Microseconds())/1000, "full-ms")
	b.ReportMetric(float64(m.lat[0].Microseconds())/1000, "first-ms")
	b.ReportMetric(float64(m.cold.Microseconds())/1000, "cold-ms")
	if waitTable {
		b.ReportMetric(m.build.Seconds(), "table-build-s")
	}
}
