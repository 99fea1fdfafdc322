//go:build !unix

package safefile

// openFlags add nothing where named pipes do not block an open.
const openFlags = 0
