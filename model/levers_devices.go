package model

// DeviceLevers are the explorer's levers of the valve lesions and support
// devices (docs/science.md §11–12), a group of their own that the explorer
// shows when one of them is on or when asked. Steps as for Levers: the least
// change worth looking at and a deliberate intervention (common practice, no
// source).
var DeviceLevers = []Lever{
	{"aortic_valve_area_cm2", "Aortic valve area", "AVA", 0.1, 0.5, 1},
	{"aortic_regurgitant_area_cm2", "Aortic regurg. area", "AR area", 0.05, 0.2, 2},
	{"mitral_valve_area_cm2", "Mitral valve area", "MVA", 0.1, 0.5, 1},
	{"mitral_regurgitant_area_cm2", "Mitral regurg. area", "MR area", 0.05, 0.2, 2},
	{"pump_flow_l_per_min", "Pump flow", "Pump", 0.5, 2, 1},
	{"pump_head_mmhg", "Pump head", "P head", 10, 50, 0},
	{"balloon_volume_ml", "Balloon volume", "Balloon", 5, 20, 0},
	{"balloon_ratio", "Balloon ratio", "B ratio", 1, 1, 0},
}
