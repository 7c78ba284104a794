package main

import "io"

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
