package main

import (
	"sort"
	"strings"
)

// unitsSection is [units]: the consistent unit system the case is written
// in. tearline computes in whatever numbers the case gives; the system only
// names the units in labels and messages, and sets the millimetre that the
// fixed lengths of ASTM E1820 are written in.
type unitsSection struct {
	System string `toml:"system"` // a key of unitSystems; default defaultUnitSystem
}

// defaultUnitSystem is the system of a case without [units]: the
// millimetre–newton–megapascal set of the examples.
const defaultUnitSystem = "mm-N-MPa"

// unitSystems are the systems a case may name. Each is consistent: stress
// is force/length², J is force/length (= energy/area), K is
// stress·√length (common practice).
var unitSystems = map[string]unitLabels{
	"mm-N-MPa": {Length: "mm", Force: "N", Stress: "MPa", J: "N/mm", JAlso: "kJ/m²", Time: "s", MM: 1},
	"m-N-Pa":   {Length: "m", Force: "N", Stress: "Pa", J: "N/m", JAlso: "J/m²", Time: "s", MM: 1e-3},
	"m-MN-MPa": {Length: "m", Force: "MN", Stress: "MPa", J: "MN/m", JAlso: "MJ/m²", Time: "s", MM: 1e-3},
}

// unitSystemNames lists the allowed systems in a stable order, the
// default first.
func unitSystemNames() []string {
	names := make([]string, 0, len(unitSystems))
	for n := range unitSystems {
		if n != defaultUnitSystem {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return append([]string{defaultUnitSystem}, names...)
}

func (u *unitsSection) complete(src *caseSource) error {
	if u.System == "" {
		u.System = defaultUnitSystem
	}
	return choice(u.System, unitSystemNames(), src, "units.system")
}

// labels names the units of the case's system (complete has checked it).
func (u unitsSection) labels() unitLabels {
	if l, ok := unitSystems[u.System]; ok {
		return l
	}
	return unitSystems[defaultUnitSystem]
}

// area is the unit of an area in the system.
func (u unitLabels) area() string { return u.Length + "²" }

// unitSystemHelp is the list of systems for `tearline help case`.
func unitSystemHelp() string {
	var parts []string
	for _, n := range unitSystemNames() {
		l := unitSystems[n]
		parts = append(parts, "\""+n+"\" ("+l.Length+", "+l.Force+", "+l.Stress+"; J in "+l.J+")")
	}
	return strings.Join(parts, ", ")
}
