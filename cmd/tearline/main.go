// Command tearline drives adaptive-remeshing ductile crack-growth
// simulations: a gradient-regularised porous-plasticity (GTN) model at
// finite strain, solved by the finite element method on a mesh that stays
// fine only around the growing crack.
//
// Usage:
//
//	tearline run CASE.toml -o DIR [--set section.key=value ...]
//	tearline resume DIR
//	tearline check CASE.toml [--set ...]
//	tearline mesh CASE.toml -o FILE.vtu [--json] [--set ...]
//	tearline demo [-o DIR]
//	tearline bench solve FILE.mtx [--rhs FILE.mtx]
//
// Results are model predictions that depend on calibrated parameters; they
// are no substitute for the applicable assessment codes and standards, and
// decisions rest with qualified engineers.
package main

import (
	"fmt"
	"io"
	"os"
)

const version = "0.1.0"

const usage = `tearline — adaptive-remeshing ductile crack growth (GTN, finite strain)

usage:
  tearline run CASE.toml -o DIR [--set section.key=value ...]   run a case into a run folder
  tearline resume DIR                                          continue a stopped or killed run
  tearline check CASE.toml [--set ...]                         validate; estimate mesh, unknowns, memory
  tearline mesh CASE.toml -o FILE.vtu [--json] [--set ...]     mesh only, with the quality report
  tearline demo [-o DIR]                                       the built-in example, a few minutes
  tearline bench solve FILE.mtx [--rhs FILE.mtx]               time the sparse solver on a system
  tearline help [case]                                         this text, or the case-file keys
  tearline version

Every command takes --help. Exit status: 0 completed, 1 stopped early (results
so far kept), 2 bad input.

Results are model predictions that depend on calibrated parameters. They are
no substitute for the applicable assessment codes and standards; decisions
rest with qualified engineers.
`

func main() {
	os.Exit(dispatch(os.Args[1:], os.Stdout, os.Stderr))
}

// dispatch runs one command and returns the exit status.
func dispatch(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	cmd, rest := args[0], args[1:]
	switch cmd {
	case "mesh":
		return meshCommand(rest, stdout, stderr)
	case "bench":
		return benchCommand(rest, stdout, stderr)
	case "help", "-h", "--help":
		if len(rest) > 0 && rest[0] == "case" {
			fmt.Fprint(stdout, caseHelp())
			return 0
		}
		fmt.Fprint(stdout, usage)
		return 0
	case "version", "--version":
		fmt.Fprintf(stdout, "tearline %s\n", version)
		return 0
	}
	if c, ok := commands(cmd); ok {
		return c(rest, stdout, stderr)
	}
	fmt.Fprintf(stderr, "tearline: unknown command %q; the commands are run, resume, check, mesh, demo, bench, help, version\n", cmd)
	return 2
}
