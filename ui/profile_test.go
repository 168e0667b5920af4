package ui

import (
	"math"
	"testing"

	"faultline/figure"
)

// The profile plot: BF and DF along the line, scaled to the data unless
// "y 0–1" is ticked, and the micrograph along the same line when one is
// shown.
func TestProfilePlotSeries(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	pp := ws.prof
	if !pp.have {
		t.Fatal("no profile along the default line")
	}
	pl := profilePlot(pp.cur, pp.unit.Checked, pp.micro, pp.mName)
	if len(pl.Series) != 2 || pl.Y != figure.YData {
		t.Errorf("without a micrograph: %d series, y scale %v", len(pl.Series), pl.Y)
	}
	pp.unit.SetChecked(true)
	if pl := profilePlot(pp.cur, pp.unit.Checked, pp.micro, pp.mName); pl.Y != figure.YUnit {
		t.Error("y 0–1 ticked but the axis is not fixed")
	}
	if err := ws.OpenDemoMicrograph(); err != nil {
		t.Fatal(err)
	}
	if pp.micro == nil {
		t.Fatal("no micrograph profile after opening the demo micrograph")
	}
	finite := 0
	for _, v := range pp.micro {
		if !math.IsNaN(v) {
			finite++
		}
	}
	if finite < len(pp.micro)/2 {
		t.Errorf("micrograph profile: %d of %d samples on the micrograph", finite, len(pp.micro))
	}
	pl = profilePlot(pp.cur, false, pp.micro, pp.mName)
	if len(pl.Series) != 3 || pl.Series[2].Name != pp.mName {
		t.Errorf("series %v", pl.Series)
	}
	if _, err := pl.Image(600, 230, 96); err != nil {
		t.Fatal(err)
	}
}
