package ui

import (
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/muesli/termenv"

	"pvcouple/model"
)

// d lists the lesion and support levers and selects the first; a lesion
// set there keeps the group listed and its readouts on screen; back at the
// baseline with everything off, d again hides the group.
func TestDevicesGroupShowsAndHides(t *testing.T) {
	m := sized(t, "normal")
	if strings.Contains(m.View(), "Aortic valve area") || m.devicesShown() {
		t.Fatal("the lesion and support levers are listed with all of them off")
	}
	keys(m, "d")
	if m.lever().Key != "aortic_valve_area_cm2" || !strings.Contains(m.View(), "Lesions & support") {
		t.Fatalf("d selected %s; screen:\n%s", m.lever().Key, m.View())
	}
	keys(m, "J", "J", "J", "J", "J") // 4.0 → 1.5 cm² in large steps
	if got := m.st.target.AorticValveArea; got != 1.5 {
		t.Fatalf("aortic valve area %g after five large steps down, want 1.5", got)
	}
	screen := m.View()
	for _, want := range []string{"AV ΔP", "MV ΔP", "RF", "fwd SV", "tot CO"} {
		if !strings.Contains(screen, want) {
			t.Errorf("a stenosis on screen, the readouts lack %q:\n%s", want, screen)
		}
	}
	if strings.Contains(screen, "NaN") {
		t.Errorf("NaN on screen:\n%s", screen)
	}
	keys(m, "d")
	if m.sel != 0 || !m.devicesShown() {
		t.Errorf("d from the group: lever %d, group listed %v (a lesion is on)", m.sel, m.devicesShown())
	}
	keys(m, "r") // back to the baseline, everything off
	if m.devicesShown() || strings.Contains(m.View(), "AV ΔP") {
		t.Errorf("at the baseline with everything off the group or its readouts stay:\n%s", m.View())
	}
}

// A selection left in the lesion group when it hides (a revert turns its
// levers off) falls back to the first lever for every key: Tab then moves
// to the second, not to wherever the stale selection counted to.
func TestHiddenGroupSelectionFallsBack(t *testing.T) {
	m := sized(t, "normal")
	keys(m, "d", "down", "d") // a lesion on, back to the main levers: the group stays listed
	for range 10 {
		keys(m, "tab") // into the lesion group
	}
	if m.lever().Key == "filling_pressure_mmhg" || !m.devicesShown() {
		t.Fatalf("ten tabs with the group listed: lever %s", m.lever().Key)
	}
	keys(m, "r")
	if m.devicesShown() || !strings.Contains(m.View(), "▸ Filling pressure") {
		t.Fatalf("after the revert: group listed %v; screen:\n%s", m.devicesShown(), m.View())
	}
	keys(m, "tab")
	if got := m.lever().Key; got != "ees_mmhg_per_ml" {
		t.Errorf("tab from the fallen-back selection selects %s, want ees_mmhg_per_ml", got)
	}
	keys(m, "shift+tab", "shift+tab")
	if got, want := m.lever().Key, model.Levers[len(model.Levers)-1].Spec().Key; got != want {
		t.Errorf("two shift+tabs from the second lever select %s, want %s", got, want)
	}
}

// A pump strong enough to keep the aortic valve shut: its readouts show,
// the valve's ejection time is 0, and nothing on screen is NaN or a negative
// volume; the beat traces gain the flow plot.
func TestPumpReadoutsAndFlowTrace(t *testing.T) {
	m := newTestModel(t, "shock", termenv.Ascii)
	press(m, tea.WindowSizeMsg{Width: 120, Height: 40})
	keys(m, "d", "tab", "tab", "tab", "tab", "K", "K", "K") // pump 0 → 6 L/min
	if got := m.st.target.PumpFlow; got != 6 {
		t.Fatalf("pump flow %g, want 6", got)
	}
	if m.st.shown == nil || m.st.shown.Params != m.st.target {
		t.Fatalf("not solved: %s", m.status)
	}
	screen := m.View()
	for _, want := range []string{"pump", "tot CO", "AV ET"} {
		if !strings.Contains(screen, want) {
			t.Errorf("readouts lack %q:\n%s", want, screen)
		}
	}
	if m.st.shown.Metrics.AVOpen != 0 {
		t.Errorf("aortic valve open %g ms at 6 L/min", m.st.shown.Metrics.AVOpen)
	}
	keys(m, "2")
	traces := m.View()
	if !strings.Contains(traces, "Q mL/s") || !strings.Contains(traces, "pump") {
		t.Errorf("the beat traces lack the flow plot:\n%s", traces)
	}
	for _, s := range []string{screen, traces} {
		if strings.Contains(s, "NaN") {
			t.Errorf("NaN on screen:\n%s", s)
		}
	}
}
