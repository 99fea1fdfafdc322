// Package presets holds pvcouple's scenario files: the YAML schema, its strict
// loader, and the built-in scenarios embedded in the binary.
//
// A scenario file (version 1) looks like this:
//
//	version: 1
//	name: my-study
//	description: one line shown in lists
//	notes: |
//	  free text
//	base: normal              # optional: built-in preset filling keys not given
//	params:
//	  filling_pressure_mmhg: 12
//	  ...                     # every key of `pvcouple params`, unless base is set
//	baseline:                 # optional: the state what-ifs are compared with
//	  ...                     # same rules as params
//
// Loading is strict: unknown or duplicate keys, wrong types, out-of-range
// values and a second YAML document are errors naming the file, line and key.
package presets
