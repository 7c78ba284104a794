package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestRunRefusesNonEmptyFolder: `run -o` into a folder that exists and
// holds anything refuses with exit 2 and leaves every file byte for byte
// as it was (DESIGN.md §6: a run folder is never written over).
func TestRunRefusesNonEmptyFolder(t *testing.T) {
	dir := t.TempDir()
	own := filepath.Join(dir, "case.toml")
	text := []byte("# the user's own commented case\n" + goodElastic)
	if err := os.WriteFile(own, text, 0o644); err != nil {
		t.Fatal(err)
	}
	var stderr bytes.Buffer
	code := dispatch([]string{"run", own, "-o", dir}, io.Discard, &stderr)
	if code != 2 || !strings.Contains(stderr.String(), "not empty") {
		t.Fatalf("exit %d, %q; want exit 2 saying the folder is not empty", code, stderr.String())
	}
	got, err := os.ReadFile(own)
	if err != nil || !bytes.Equal(got, text) {
		t.Fatalf("the user's file changed: %v", err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("the folder holds %d entries after the refusal, want 1", len(entries))
	}
}

// TestRunFolderLock: a folder locked by a live process (here, this one)
// refuses a second writer; a lock left by a process that has died is
// taken over and removed at the end (common practice for PID lock files).
func TestRunFolderLock(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, lockName)
	if err := os.WriteFile(path, []byte(strconv.Itoa(os.Getpid())+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := lockRunFolder(dir); err == nil || !strings.Contains(err.Error(), "in use by process") {
		t.Fatalf("live lock: %v, want refused as in use", err)
	}
	// A process id above the kernel's limit (pid_max ≤ 2²²) is never alive.
	if err := os.WriteFile(path, []byte("99999999\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	unlock, err := lockRunFolder(dir)
	if err != nil {
		t.Fatalf("stale lock not taken over: %v", err)
	}
	if pid, alive := lockOwner(path); pid != os.Getpid() || !alive {
		t.Errorf("lock holds %d, want this process %d", pid, os.Getpid())
	}
	unlock()
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("lock still there after unlock: %v", err)
	}
}
