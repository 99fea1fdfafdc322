//go:build !unix

package server

// nonBlock is 0 where there are no FIFOs to wait on.
const nonBlock = 0
