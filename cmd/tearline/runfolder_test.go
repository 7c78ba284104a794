package main

import (
	"math"
	"strings"
	"testing"
)

// TestParseHistoryRow reads history rows of run folders written before and
// after the last columns were appended (DESIGN.md §6: columns are only
// ever appended, so an older folder still resumes): the missing columns
// read as NaN (empty), a row of another length is an error.
func TestParseHistoryRow(t *testing.T) {
	full := make([]string, len(historyColumns))
	for i := range full {
		full[i] = "1"
	}
	full[6] = "0.25" // da
	for _, tc := range []struct {
		name          string
		fields        int
		flag, daFront float64 // NaN: empty
		err           bool
	}{
		{"current", len(historyColumns), 1, 1, false},
		{"before da_front", len(historyColumns) - 1, 1, math.NaN(), false},
		{"before J_domain_flag", len(historyColumns) - 2, math.NaN(), math.NaN(), false},
		{"too short", len(historyColumns) - 3, 0, 0, true},
		{"too long", len(historyColumns) + 1, 0, 0, true},
	} {
		f := append([]string(nil), full...)
		for len(f) < tc.fields {
			f = append(f, "1")
		}
		r, err := parseHistoryRow(strings.Join(f[:tc.fields], ","))
		if (err != nil) != tc.err {
			t.Errorf("%s: error %v, want error %v", tc.name, err, tc.err)
			continue
		}
		if tc.err {
			continue
		}
		same := func(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }
		if r.Da != 0.25 || !same(r.JDomainFlag, tc.flag) || !same(r.DaFront, tc.daFront) {
			t.Errorf("%s: da %g, J_domain_flag %g, da_front %g; want 0.25, %g, %g", tc.name, r.Da, r.JDomainFlag, r.DaFront, tc.flag, tc.daFront)
		}
	}
}
