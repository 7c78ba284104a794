package material

import (
	"bytes"
	"fmt"
	"math"
	"os/exec"
	"strconv"
	"strings"
	"testing"
)

// Reference: SciPy's matrix logarithm scipy.linalg.logm (inverse scaling and
// squaring, Al-Mohy & Higham 2012), run with /usr/bin/python3; E = ½ logm(C)
// on the same cases as the eigensolver check. Skipped when SciPy is absent.
func TestLogStrainAgainstSciPy(t *testing.T) {
	if _, err := exec.LookPath("/usr/bin/python3"); err != nil {
		t.Skip("no /usr/bin/python3")
	}
	cs := logCases()
	var in bytes.Buffer
	for _, tc := range cs {
		C := tc.C
		fmt.Fprintf(&in, "%.17g %.17g %.17g %.17g\n", C[0], C[1], C[2], C[3])
	}
	const script = `
import sys, numpy as np
from scipy.linalg import logm
for line in sys.stdin:
    a, b, c, s = map(float, line.split())
    L = logm(np.array([[a, s, 0], [s, b, 0], [0, 0, c]])).real / 2
    print("%.17g %.17g %.17g %.17g" % (L[0, 0], L[1, 1], L[2, 2], L[0, 1]))
`
	cmd := exec.Command("/usr/bin/python3", "-c", script)
	cmd.Stdin = &in
	out, err := cmd.Output()
	if err != nil {
		if strings.Contains(err.Error(), "exit status") {
			t.Skipf("python3 with scipy not usable: %v", err)
		}
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	if len(lines) != len(cs) {
		t.Fatalf("scipy returned %d lines for %d cases", len(lines), len(cs))
	}
	for k, tc := range cs {
		E, _ := LogStrain(tc.C)
		f := strings.Fields(lines[k])
		for i := 0; i < 4; i++ {
			want, err := strconv.ParseFloat(f[i], 64)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(E[i]-want) > 1e-12*(1+math.Abs(want)) {
				t.Errorf("%s: E[%d] = %.16g, scipy logm %.16g", tc.name, i, E[i], want)
			}
		}
	}
}
