package main

import (
	"flag"
	"fmt"
	"io"
)

// commands returns the handler of a subcommand.
func commands(name string) (func(args []string, stdout, stderr io.Writer) int, bool) {
	switch name {
	case "run":
		return runCommand, true
	case "resume":
		return resumeCommand, true
	case "check":
		return checkCommand, true
	case "demo":
		return demoCommand, true
	}
	return nil, false
}

// runArgs are the arguments of a command that starts a run (run, demo):
// the positional ones, the run folder (-o) and the --set overrides.
type runArgs struct {
	pos  []string
	out  string
	sets []string
}

// parseRunArgs parses the arguments of a command that starts a run, whose
// run folder defaults to out; done is true when the caller should return
// code at once (see parseCommand).
func parseRunArgs(name, usage, out string, args []string, stderr io.Writer) (a runArgs, code int, done bool) {
	fs := newFlags(name, usage, stderr)
	dir := fs.String("o", out, "run folder")
	sets := setOverrides(fs)
	pos, code, done := parseCommand(fs, args)
	return runArgs{pos: pos, out: *dir, sets: *sets}, code, done
}

// oneArgument parses a command's arguments with fs and wants exactly one
// positional argument; without it, it prints missing and the usage. done is
// true when the caller should return code at once.
func oneArgument(fs *flag.FlagSet, args []string, missing, usage string, stderr io.Writer) (arg string, code int, done bool) {
	pos, code, done := parseCommand(fs, args)
	if done {
		return "", code, true
	}
	if len(pos) != 1 {
		fmt.Fprintf(stderr, "%s\n%s", missing, usage)
		return "", 2, true
	}
	return pos[0], 0, false
}
