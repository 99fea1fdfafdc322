// Package cli is pvcouple's command line: it parses arguments, runs a
// command and reports errors with the exit codes of main (0 ok, 1 runtime
// error, 2 usage error).
package cli
