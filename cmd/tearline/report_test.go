package main

import (
	"bytes"
	"context"
	"image/png"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// chromium is the path of a Chromium to open reports in, "" without one.
func chromium() string {
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// checkReportInBrowser opens DIR/report.html in headless Chromium, takes a
// screenshot and reads back the page's own render check: every plot of
// plots/ must have been decoded (natural size) and laid out (shown size)
// with no script error.
func checkReportInBrowser(t *testing.T, dir string) {
	t.Helper()
	exe := chromium()
	if exe == "" {
		t.Skip("no Chromium on this machine (Debian package chromium, installed by .ci/run): report.html not opened in a browser")
	}
	page, err := filepath.Abs(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	shot := filepath.Join(t.TempDir(), "report.png")
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	// --no-sandbox: CI runs as root, where Chromium refuses its sandbox.
	cmd := exec.CommandContext(ctx, exe, "--headless", "--no-sandbox", "--disable-gpu", "--hide-scrollbars",
		"--user-data-dir="+t.TempDir(), "--window-size=1200,2400", "--screenshot="+shot, "--dump-dom", "file://"+page)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	start := time.Now()
	dom, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s: %v\n%s", exe, err, stderr.String())
	}
	t.Logf("Chromium opened %s in %.1f s", page, time.Since(start).Seconds())
	m := regexp.MustCompile(`(?s)<pre id="render-check"[^>]*>(.*?)</pre>`).FindSubmatch(dom)
	if m == nil {
		t.Fatalf("the page's render check is missing from the DOM (%d bytes)", len(dom))
	}
	svgs, _ := filepath.Glob(filepath.Join(dir, "plots", "*.svg"))
	check := string(m[1])
	want := regexp.MustCompile(`(?m)^done (\d+) plots, 0 not shown, 0 errors$`).FindStringSubmatch(check)
	if want == nil || want[1] != strconv.Itoa(len(svgs)) {
		t.Errorf("render check %q; want all %d plots of plots/ shown and no script error", check, len(svgs))
	}
	sizes := regexp.MustCompile(`(?m)^plot (\S+) natural (\d+)x(\d+) shown (\d+)x(\d+)$`).FindAllStringSubmatch(check, -1)
	for _, s := range sizes {
		if slices.Contains(s[2:], "0") {
			t.Errorf("plot %s has a zero size: %s", s[1], s[0])
		}
	}
	if len(sizes) != len(svgs) {
		t.Errorf("render check lists %d plots, plots/ holds %d", len(sizes), len(svgs))
	}
	checkScreenshot(t, shot)
}

// checkScreenshot checks that the screenshot is a picture of the window's
// size with something drawn on it (more than a handful of colours).
func checkScreenshot(t *testing.T, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("no screenshot: %v", err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	b := img.Bounds()
	colours := map[[3]uint32]bool{}
	for y := b.Min.Y; y < b.Max.Y; y += 3 {
		for x := b.Min.X; x < b.Max.X; x += 3 {
			r, g, bl, _ := img.At(x, y).RGBA()
			colours[[3]uint32{r >> 8, g >> 8, bl >> 8}] = true
		}
	}
	t.Logf("screenshot %dx%d, %d bytes, %d colours", b.Dx(), b.Dy(), len(data), len(colours))
	if b.Dx() != 1200 || b.Dy() != 2400 || len(colours) < 50 {
		t.Errorf("screenshot %dx%d with %d colours; want 1200x2400 with text and plots on it", b.Dx(), b.Dy(), len(colours))
	}
}

// TestReportInBrowser runs the elastic cracked disk of the test data (two
// steps) and opens its report in a real browser.
func TestReportInBrowser(t *testing.T) {
	out := runCase(t, "../../testdata/williams-elastic.toml", "mesh.h_far=3")
	checkReportInBrowser(t, out)
}

// TestReportStates: the page names the run's state and why, reloads
// itself only while the run goes on, and refers to nothing outside itself.
func TestReportStates(t *testing.T) {
	completed := runCase(t, writeCase(t, goodElastic))
	stopped := filepath.Join(t.TempDir(), "run")
	if code := dispatch([]string{"run", writeCase(t, goodElastic), "-o", stopped, "--set", "stop.max_steps=1"}, io.Discard, io.Discard); code != 1 {
		t.Fatalf("run stopped by stop.max_steps: exit %d, want 1", code)
	}
	for _, c := range []struct {
		name, dir string
		want      []string
		refresh   bool
	}{
		{"completed", completed, []string{`class="state completed">completed</span> reached stop.t = 1`}, false},
		{"stopped by its step limit", stopped, []string{`class="state stopped">stopped</span>`, "max_steps"}, false},
		{"running", runningPage(t, completed), []string{`class="state running">running</span> at step 1`}, true},
	} {
		data, err := os.ReadFile(filepath.Join(c.dir, "report.html"))
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		page := string(data)
		for _, w := range c.want {
			if !strings.Contains(page, w) {
				t.Errorf("%s: report.html lacks %q", c.name, w)
			}
		}
		if got := strings.Contains(page, `http-equiv="refresh"`); got != c.refresh {
			t.Errorf("%s: page reloads itself: %v, want %v", c.name, got, c.refresh)
		}
		selfContained(t, c.name, page)
		for _, w := range []string{"qualified engineers", "safety decisions", "[material]"} {
			if !strings.Contains(page, w) {
				t.Errorf("%s: report.html lacks %q (cautions and the case)", c.name, w)
			}
		}
	}
}

// runningPage writes the page of a run still going (at step 1) into a copy
// of a run folder's case and returns the folder.
func runningPage(t *testing.T, from string) string {
	t.Helper()
	dir := t.TempDir()
	text, err := os.ReadFile(filepath.Join(from, "case.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "case.toml"), text, 0o644); err != nil {
		t.Fatal(err)
	}
	c, _, rs, err := prepareCase(filepath.Join(dir, "case.toml"), nil)
	if err != nil {
		t.Fatal(err)
	}
	rp := newRunReport(dir, c, newPlotSetup(c, rs, defaultUnits()))
	st := runState{State: "running", Reason: "at step 1", Steps: 1, T: 0.5, Da: math.NaN()}
	if err := rp.write(syntheticRows(1, false, false), nil, st); err != nil {
		t.Fatal(err)
	}
	return dir
}

// selfContained checks that a page loads nothing from elsewhere: every
// src and href is a data: URI, and no style sheet or font is linked.
func selfContained(t *testing.T, name, page string) {
	t.Helper()
	for _, m := range regexp.MustCompile(`(?i)\b(src|href)\s*=\s*"([^"]*)"`).FindAllStringSubmatch(page, -1) {
		if !strings.HasPrefix(m[2], "data:") {
			t.Errorf("%s: report.html refers to %s=%q (it must stand alone)", name, m[1], m[2])
		}
	}
	for _, w := range []string{"<link", "@import", "url(", "<iframe"} {
		if strings.Contains(page, w) {
			t.Errorf("%s: report.html holds %q (it must stand alone)", name, w)
		}
	}
}

// TestRemeshTable reads a remesh.csv made here and checks the page's row:
// the columns in the page's order and the force changes of the transfer
// (+0.5%) and of the re-equilibration (−0.25%) worked by hand from the
// forces 1000, 1005 and 997.5.
func TestRemeshTable(t *testing.T) {
	path := filepath.Join(t.TempDir(), "remesh.csv")
	tab, err := createCSV(path, remeshColumns)
	if err != nil {
		t.Fatal(err)
	}
	row := map[string]string{"remesh": "1", "step": "7", "da": "0.0612345678", "reason": "front within 1ℓ of the zone edge",
		"force_before": "1000", "force_after_transfer": "1005", "force_after_equilibrium": "997.5", "dofs_before": "16000", "dofs_after": "16398"}
	var fields []string
	for _, c := range remeshColumns {
		fields = append(fields, row[c])
	}
	if err := tab.write(fields); err != nil {
		t.Fatal(err)
	}
	tab.Close()
	rt, err := readRemeshTable(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(rt.Rows) != 1 {
		t.Fatalf("%d rows, want 1", len(rt.Rows))
	}
	got := rt.Rows[0]
	want := map[int]string{0: "1", 1: "7", 2: "0.061235", 3: "front within 1ℓ of the zone edge", 4: "16000", 5: "16398",
		9: "1000", 10: "1005", 11: "997.5", 12: "+0.500%", 13: "-0.250%"}
	for i, w := range want {
		if got[i] != w {
			t.Errorf("cell %d = %q, want %q (row %q)", i, got[i], w, got)
		}
	}
	// The page's second header row has one heading per cell.
	heads := strings.Count(reportHTML[strings.Index(reportHTML, "<th>#</th>"):strings.Index(reportHTML, "{{range .Remesh.Rows}}")], "<th>")
	if len(got) != heads {
		t.Errorf("%d cells per row, %d headings", len(got), heads)
	}
	if rt, err := readRemeshTable(filepath.Join(t.TempDir(), "none.csv")); err != nil || len(rt.Rows) != 0 {
		t.Errorf("absent remesh.csv: %v, %d rows; want no rows and no error", err, len(rt.Rows))
	}
}
