package ui

import (
	"sort"
	"testing"
	"time"

	"faultline/scene"
)

// moveLatencies moves the thickness of the demo scene k times as a slider
// would and returns, for each move, the time from the change to the
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
		tNm := 100 + float64(i%20)
		t0 := time.Now()
		if err := c.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = tNm }); err != nil {
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

// The preview of the demo scene arrives well within a second of a slider
// move (the design target is 100 ms on a 2-core machine; the benchmark
// below reports the measured value, this test guards against a gross
// regression on a busy machine).
func TestPreviewLatencyDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("renders the demo scene several times")
	}
	pv, full := moveLatencies(t, 5)
	t.Logf("demo scene: preview after a slider move %v (median of %d), full render %v", median(pv), len(pv), median(full))
	if m := median(pv); m > time.Second {
		t.Errorf("preview latency %v, want well under 1 s (target 100 ms)", m)
	}
}

// BenchmarkPreviewAfterSliderMove reports the time from a change of the
// demo scene's thickness to its preview reaching the UI goroutine
// (preview-ms) and the full render time (full-ms).
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

// BenchmarkPreviewDuringDrag moves the demo scene's thickness every 16 ms
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
			tNm := 120 + 2*float64(k)
			c.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = tNm })
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
