package ui

import (
	"fmt"

	"pvcouple/model"
)

// The valve lesion and support device levers are a group of their own
// (model.DeviceLevers), listed after the main levers while one of them is on
// or while the user has asked for them with the Devices key.

// allLevers are the main levers followed by the lesion and support group.
var allLevers = append(append([]model.Lever(nil), model.Levers...), model.DeviceLevers...)

// deviceGroup says which lesion or support readouts a beat needs.
type deviceGroup uint8

const (
	groupLesion deviceGroup = 1 << iota
	groupPump
	groupBalloon
)

// deviceGroups returns the groups of readouts the parameters p need.
func deviceGroups(p *model.Params) deviceGroup {
	var g deviceGroup
	if p.AorticValveArea != model.NormalAorticValveArea || p.MitralValveArea != model.NormalMitralValveArea ||
		p.AorticRegurgitantArea > 0 || p.MitralRegurgitantArea > 0 {
		g |= groupLesion
	}
	if p.PumpFlow > 0 {
		g |= groupPump
	}
	if p.BalloonVolume > 0 {
		g |= groupBalloon
	}
	return g
}

// devicesShown reports whether the lever panel lists the lesion and support
// group: asked for, or one of its levers on.
func (m *Model) devicesShown() bool { return m.showDevices || m.st.target.HasDevice() }

// leverList returns the levers the panel lists and the selection moves over.
func (m *Model) leverList() []model.Lever {
	if m.devicesShown() {
		return allLevers
	}
	return model.Levers
}

// selected returns the index of the selected lever in leverList. A
// selection in a group no longer shown (the levers turned off by an undo, a
// revert or a load) falls back to the first lever.
func (m *Model) selected() int {
	if m.sel >= len(m.leverList()) {
		return 0
	}
	return m.sel
}

// lever returns the selected lever.
func (m *Model) lever() model.Lever { return m.leverList()[m.selected()] }

// toggleDevices moves the selection into the lesion and support group,
// showing it, or back to the main levers, hiding the group again unless
// one of its levers is on.
func (m *Model) toggleDevices() {
	n := len(model.Levers)
	if m.selected() < n {
		m.showDevices = true
		m.selectLever(n)
		m.setStatus("Valve lesions and support: " + m.status)
		return
	}
	m.showDevices = false
	m.selectLever(0)
	if m.devicesShown() {
		m.setStatus(fmt.Sprintf("Main levers; the lesion and support levers stay listed while one is on. %s", m.status))
	}
}
