package main

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

// historyColumns is the stable header of history.csv (DESIGN.md §6). New
// columns are only ever appended.
var historyColumns = []string{
	"step", "t", "control", "force", "J_far", "J_domain", "da", "da_proj", "ctod",
	"dofs", "elements", "remeshes", "iters", "wall_s", "rss_mb",
	"J_E1820", "tearing_modulus", "max_porosity",
	"cutbacks", "load_factor", "gauge",
	"J_domain_flag", "da_front",
}

// historyRow is one converged step. NaN marks a quantity that does not
// apply to the case; it is written as an empty field.
type historyRow struct {
	Step                                    int
	T, Control, Force, JFar, JDomain        float64
	Da, DaProj, CTOD                        float64
	Dofs, Elements, Remeshes, Iters         int
	Wall, RSS, JE1820, Tearing, MaxPorosity float64
	// Cutbacks are the failed attempts before the step converged;
	// LoadFactor the load factor reached (t under load control); Gauge
	// the reading of the specimen's gauge (what an opening control drives).
	Cutbacks          int
	LoadFactor, Gauge float64
	// JDomainFlag is 1 when the rings of J_domain hold process-zone
	// material (ringsInProcessZone), 0 when not, NaN without a domain J.
	JDomainFlag float64
	// DaFront is Δa measured to the damage front interpolated inside the
	// elements (criteria.Growth.DAFront), the largest over the tips.
	DaFront float64
}

func (r historyRow) fields() []string {
	f := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', 12, 64)
	}
	i := strconv.Itoa
	return []string{i(r.Step), f(r.T), f(r.Control), f(r.Force), f(r.JFar), f(r.JDomain), f(r.Da), f(r.DaProj),
		f(r.CTOD), i(r.Dofs), i(r.Elements), i(r.Remeshes), i(r.Iters), f(r.Wall), f(r.RSS), f(r.JE1820),
		f(r.Tearing), f(r.MaxPorosity), i(r.Cutbacks), f(r.LoadFactor), f(r.Gauge), f(r.JDomainFlag),
		f(r.DaFront)}
}

// readHistory reads the first n data rows of history.csv.
func readHistory(path string, n int) ([]historyRow, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	lines := strings.Split(string(data), "\n")
	if len(lines) < n+1 {
		return nil, fmt.Errorf("%s holds %d rows, the checkpoint expects at least %d", path, len(lines)-1, n)
	}
	var rows []historyRow
	for i := 1; i <= n; i++ {
		r, err := parseHistoryRow(lines[i])
		if err != nil {
			return nil, fmt.Errorf("%s line %d: %w", path, i+1, err)
		}
		rows = append(rows, r)
	}
	return rows, nil
}

func parseHistoryRow(line string) (historyRow, error) {
	f := strings.Split(line, ",")
	// A run folder from before J_domain_flag or da_front lacks the last
	// columns: they are empty.
	for n := len(historyColumns) - len(f); n > 0 && n <= 2; n-- {
		f = append(f, "")
	}
	if len(f) != len(historyColumns) {
		return historyRow{}, fmt.Errorf("%d fields, want %d", len(f), len(historyColumns))
	}
	num := func(s string) float64 {
		if s == "" {
			return math.NaN()
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return math.NaN()
		}
		return v
	}
	in := func(s string) int { v, _ := strconv.Atoi(s); return v }
	return historyRow{Step: in(f[0]), T: num(f[1]), Control: num(f[2]), Force: num(f[3]), JFar: num(f[4]),
		JDomain: num(f[5]), Da: num(f[6]), DaProj: num(f[7]), CTOD: num(f[8]), Dofs: in(f[9]), Elements: in(f[10]),
		Remeshes: in(f[11]), Iters: in(f[12]), Wall: num(f[13]), RSS: num(f[14]), JE1820: num(f[15]),
		Tearing: num(f[16]), MaxPorosity: num(f[17]), Cutbacks: in(f[18]), LoadFactor: num(f[19]), Gauge: num(f[20]),
		JDomainFlag: num(f[21]), DaFront: num(f[22])}, nil
}

// csvTable appends rows to a CSV file, flushing and syncing each row so that
// a killed run loses at most the row being written.
type csvTable struct {
	f *os.File
	w *bufio.Writer
}

// createCSV creates (truncates) path and writes the header.
func createCSV(path string, header []string) (*csvTable, error) {
	f, err := os.Create(path)
	if err != nil {
		return nil, err
	}
	t := &csvTable{f: f, w: bufio.NewWriter(f)}
	if err := t.write(header); err != nil {
		f.Close()
		return nil, err
	}
	return t, nil
}

// reopenCSV opens an existing table for appending, truncated to its first
// keep data rows (used on resume: rows after the checkpoint are dropped and
// recomputed).
func reopenCSV(path string, keep int) (*csvTable, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	lines := strings.SplitAfter(string(data), "\n")
	n := 0
	size := 0
	for _, ln := range lines {
		if !strings.HasSuffix(ln, "\n") { // partial last line of a killed run
			break
		}
		if n > keep {
			break
		}
		size += len(ln)
		n++
	}
	if err := os.Truncate(path, int64(size)); err != nil {
		return nil, err
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_APPEND, 0o644)
	if err != nil {
		return nil, err
	}
	return &csvTable{f: f, w: bufio.NewWriter(f)}, nil
}

func (t *csvTable) write(fields []string) error {
	for i, s := range fields {
		if i > 0 {
			t.w.WriteByte(',')
		}
		if strings.ContainsAny(s, ",\"\n") {
			s = `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
		}
		t.w.WriteString(s)
	}
	t.w.WriteByte('\n')
	if err := t.w.Flush(); err != nil {
		return err
	}
	return t.f.Sync()
}

func (t *csvTable) Close() error { return t.f.Close() }

// writeFileAtomic writes data to path through a temporary file in the same
// folder, synced and renamed, so that a reader (or a resumed run) sees
// either the old file or the new one, never half of one.
func writeFileAtomic(path string, write func(io.Writer) error) error {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return err
	}
	name := tmp.Name()
	fail := func(err error) error {
		tmp.Close()
		os.Remove(name)
		return err
	}
	bw := bufio.NewWriterSize(tmp, 1<<20)
	if err := write(bw); err != nil {
		return fail(err)
	}
	if err := bw.Flush(); err != nil {
		return fail(err)
	}
	if err := tmp.Chmod(0o644); err != nil { // CreateTemp makes 0600
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return err
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return err
	}
	// Sync the folder so the rename itself survives a crash.
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

// summary is summary.json (DESIGN.md §6).
type summary struct {
	Status       string  `json:"status"` // "completed" or "stopped"
	Reason       string  `json:"reason,omitempty"`
	Steps        int     `json:"steps"`
	Remeshes     int     `json:"remeshes"`
	FinalDa      float64 `json:"final_da"`
	FinalT       float64 `json:"final_t"`
	PeakDofs     int     `json:"peak_unknowns"`
	PeakRSSMB    float64 `json:"peak_memory_mb"`
	WallSeconds  float64 `json:"wall_s"`
	Version      string  `json:"version"`
	CaseSHA256   string  `json:"case_sha256"`
	Caution      string  `json:"caution"`
	MedianIters  float64 `json:"median_iterations_per_step"`
	FinalJDomain float64 `json:"final_J_domain,omitempty"`
}

const caution = "Model prediction from calibrated parameters; not a substitute for the applicable " +
	"assessment codes and standards. Decisions rest with qualified engineers."

func writeSummary(dir string, s summary) error {
	s.Caution = caution
	s.Version = version
	return writeFileAtomic(filepath.Join(dir, "summary.json"), func(w io.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(s)
	})
}

// modelKeys is the model of a case — every key but those of [stop] and
// [output], defaults filled in — as a flat map from the dotted key to its
// value's text. A checkpoint stores it, and resume compares key by key, so
// that it names what changed and accepts the keys a later version of the
// program added (a run folder written before them never set them).
func modelKeys(c *caseFile) (map[string]string, error) {
	m := *c
	m.Stop, m.Output = stopSection{}, outputSection{}
	text, err := m.encode()
	if err != nil {
		return nil, err
	}
	var tree map[string]any
	if _, err := toml.Decode(string(text), &tree); err != nil {
		return nil, fmt.Errorf("model of the case: %w", err)
	}
	keys := map[string]string{}
	flattenKeys("", tree, keys)
	delete(keys, "stop")
	delete(keys, "output")
	return keys, nil
}

// flattenKeys adds the leaves of v under prefix to keys; arrays of tables
// are numbered (loading.fix.1.label).
func flattenKeys(prefix string, v any, keys map[string]string) {
	join := func(k string) string {
		if prefix == "" {
			return k
		}
		return prefix + "." + k
	}
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			flattenKeys(join(k), e, keys)
		}
	case []map[string]any:
		for i, e := range x {
			flattenKeys(join(strconv.Itoa(i+1)), e, keys)
		}
	default:
		keys[prefix] = fmt.Sprint(x)
	}
}

// changedKeys lists the keys of the model was whose values differ in now
// or that now lacks, with both values, in key order; keys only now has are
// new to the program and do not count.
func changedKeys(was, now map[string]string) []string {
	var out []string
	for k, a := range was {
		if b, ok := now[k]; !ok {
			out = append(out, fmt.Sprintf("%s (was %s, now absent)", k, a))
		} else if a != b {
			out = append(out, fmt.Sprintf("%s (was %s, now %s)", k, a, b))
		}
	}
	sort.Strings(out)
	return out
}

func hashBytes(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// peakRSSMB reads the peak resident set size of this process (Linux
// /proc/self/status VmHWM); 0 where it is not available.
func peakRSSMB() float64 {
	data, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, ln := range strings.Split(string(data), "\n") {
		if strings.HasPrefix(ln, "VmHWM:") {
			var kb float64
			fmt.Sscanf(strings.TrimSpace(strings.TrimPrefix(ln, "VmHWM:")), "%g", &kb)
			return kb / 1024
		}
	}
	return 0
}
