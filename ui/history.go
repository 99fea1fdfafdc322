package ui

import "pvcouple/model"

// snapshot is what undo and redo restore: the scenario's name, the levers
// and the baseline.
type snapshot struct {
	name, origin string
	target       model.Params
	base         *model.Steady
}

// maxHistory caps the undo steps kept.
const maxHistory = 500

// history is the undo and redo stacks.
type history struct {
	undo, redo []snapshot
}

// push records the state before a change and forgets the redo stack.
func (h *history) push(s snapshot) {
	if n := len(h.undo); n > 0 && h.undo[n-1] == s {
		return
	}
	h.undo = append(h.undo, s)
	if len(h.undo) > maxHistory {
		h.undo = h.undo[len(h.undo)-maxHistory:]
	}
	h.redo = h.redo[:0]
}

// back returns the state to restore on undo, recording cur for redo; ok is
// false when there is nothing to undo.
func (h *history) back(cur snapshot) (snapshot, bool) { return move(&h.undo, &h.redo, cur) }

// forward returns the state to restore on redo, recording cur for undo.
func (h *history) forward(cur snapshot) (snapshot, bool) { return move(&h.redo, &h.undo, cur) }

// move pops the newest state of from that differs from cur and pushes cur on
// to; ok is false when from holds no such state.
func move(from, to *[]snapshot, cur snapshot) (snapshot, bool) {
	for len(*from) > 0 {
		s := (*from)[len(*from)-1]
		*from = (*from)[:len(*from)-1]
		if s != cur {
			*to = append(*to, cur)
			return s, true
		}
	}
	return snapshot{}, false
}
