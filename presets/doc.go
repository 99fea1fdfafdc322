// Package presets holds pvcouple's scenario and protocol files: the YAML
// schemas, their strict loaders, the expansion of a protocol into per-beat
// parameters, and the built-in scenarios and protocols embedded in the binary.
//
// A scenario file (version 1) looks like this:
//
//	version: 1
//	name: my-study
//	description: one line shown in lists
//	notes: |
//	  free text
//	base: normal              # optional: built-in preset filling keys not given
//	circulation: closed       # optional: closed (the default) or held
//	params:
//	  filling_pressure_mmhg: 12
//	  ...                     # every key of `pvcouple params`, unless base is set; keys of
//	                          # the closed circulation come from the default preset, valve
//	                          # lesion and support keys left out are off (no lesion, no
//	                          # device), and stressed_volume_ml, if not given, is found so
//	                          # that the mean left-atrial pressure is filling_pressure_mmhg
//	baseline:                 # optional: the state what-ifs are compared with
//	  ...                     # same rules as params
//
// A protocol file (version 1) is a list of labelled steps that change the
// levers between beats (see Protocol.Expand for the exact schedule):
//
//	version: 1
//	name: my-occlusion        # optional: the file's base name otherwise
//	description: one line shown in lists
//	notes: |
//	  free text
//	steps:
//	  - label: baseline       # every step has a one-line label (at most 60 characters)
//	    hold: 5               # hold: leave the levers alone for 5 beats
//	  - label: occlusion
//	    circulation: held     # optional: the step runs in that circulation only
//	    ramp:                 # ramp: move in equal parts over `beats`, reaching the target on the last
//	      filling_pressure_mmhg: {factor: 0.4}   # target: a value, `initial` or {factor: F}
//	    beats: 12             # required for a ramp
//	  - label: pressor
//	    scale: {resistance_mmhg_s_per_ml: 1.5}   # scale: multiply at once
//	    beats: 10             # set and scale: beats at the new values (default 1)
//	  - label: release
//	    circulation: held
//	    set: {filling_pressure_mmhg: initial}    # set: a value, or `initial` (the value before step 1)
//
// A closed run changes preload with caval_occlusion_pct or stressed_volume_ml,
// never the filling pressure; a step that changes a lever of the other
// circulation is refused when the protocol is expanded.
//
// Built-in protocols are embedded from protocols/*.yaml. A protocol holds at
// most MaxProtocolBeats beats.
//
// Loading is strict: unknown or duplicate keys, wrong types, out-of-range
// values, YAML aliases, files over MaxFileSize and a second YAML document are
// errors naming the file, line and key.
package presets
