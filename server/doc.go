// Package server is pvcouple's lab server: one process that serves the
// explorer over SSH to every fellow of a lab, so that `ssh -p 2222 lab-host`
// opens the explorer directly, with no shell account on the machine.
//
// Identity comes from the key alone. Each line of the authorized-keys file
// (OpenSSH's format) names one fellow, by a name="…" option or the key's
// comment; that name picks the fellow's folder DATA/users/NAME, where the
// explorer's files are saved and opened, beside the lab's shared folder
// DATA/shared, which sessions only read. The login name a client asks for is
// logged and otherwise ignored, so one fellow's key can never open another's
// folder.
//
// There is nothing else to reach: no password or keyboard-interactive
// login, no shell, no commands, no port or agent forwarding, no X11, no
// subsystems (so no SFTP). Each session is its own explorer (package ui)
// with its own renderer and colour profile, taken from the client's TERM and
// NO_COLOR; the solves of all sessions share the machine through one pool
// (internal/pool).
//
// The server logs one structured line per connection, refused
// authentication, refused request, save and disconnect, never key material
// or file contents. It is a model for research and education planning, not
// for treating patients.
package server
