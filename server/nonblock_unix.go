//go:build unix

package server

import "syscall"

// nonBlock opens a file without waiting for a writer, should it be a FIFO;
// it is refused as not regular once open.
const nonBlock = syscall.O_NONBLOCK
