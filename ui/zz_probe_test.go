package ui
import ("testing";"fyne.io/fyne/v2/test";"fyne.io/fyne/v2";"fyne.io/fyne/v2/container")
func TestProbeMin(t *testing.T){
	a:=test.NewApp(); defer a.Quit()
	ws:=NewWorkspace(a,nil,func(f func()){})
	sc,_,_:=startScene(""); ws.ctrl.Replace(sc,"",true)
	t.Log("content",ws.Content().MinSize())
	for i,it:=range ws.tabs.Items{ t.Log("tab",i,it.Content.MinSize()) }
	var walk func(o fyne.CanvasObject, d int)
	walk=func(o fyne.CanvasObject,d int){ if d>6 {return}; if c,ok:=o.(*fyne.Container);ok{ for _,ch:=range c.Objects{ if ch.MinSize().Height>600 { t.Logf("%*s%T %v",d*2,"",ch,ch.MinSize()) ; walk(ch,d+1)} } }; if s,ok:=o.(*container.Split);ok{ walk(s.Leading,d+1); walk(s.Trailing,d+1); t.Logf("split %v %v",s.Leading.MinSize(),s.Trailing.MinSize())} }
	walk(ws.Content(),0)
}
