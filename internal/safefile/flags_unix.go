//go:build unix

package safefile

import "syscall"

// openFlags keep an open from blocking on a named pipe put in the file's
// place after it was checked, and from making a terminal device the
// process's controlling terminal. Neither changes how a regular file reads.
const openFlags = syscall.O_NONBLOCK | syscall.O_NOCTTY
