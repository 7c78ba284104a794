package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
)

// lockName is the lock file of a run folder in use: it holds the process
// id of the run or resume that writes the folder.
const lockName = "run.lock"

// lockRunFolder keeps a second run or resume out of dir while this process
// writes it. A lock whose process has died (a killed run) is taken over.
// The returned function removes the lock.
func lockRunFolder(dir string) (func(), error) {
	path := filepath.Join(dir, lockName)
	// The lock appears with its process id already in it (a hard link of a
	// written temporary file), so no reader ever sees an empty lock.
	tmp := filepath.Join(dir, fmt.Sprintf(".%s.%d", lockName, os.Getpid()))
	if err := os.WriteFile(tmp, []byte(fmt.Sprintf("%d\n", os.Getpid())), 0o644); err != nil {
		return nil, err
	}
	defer os.Remove(tmp)
	for attempt := 0; attempt < 2; attempt++ {
		err := os.Link(tmp, path)
		if err == nil {
			return func() { os.Remove(path) }, nil
		}
		if !errors.Is(err, fs.ErrExist) {
			return nil, err
		}
		pid, alive := lockOwner(path)
		if alive {
			return nil, fmt.Errorf("in use by process %d (%s); wait for it to end or stop it", pid, path)
		}
		// the owner died without removing its lock: take it over
		if err := os.Remove(path); err != nil && !errors.Is(err, fs.ErrNotExist) {
			return nil, err
		}
	}
	return nil, fmt.Errorf("could not take the lock %s", path)
}

// lockOwner reads the process id of a lock file and reports whether that
// process is alive (signal 0 probes it without touching it).
func lockOwner(path string) (int, bool) {
	data, err := os.ReadFile(path)
	if err != nil {
		return 0, false
	}
	pid, err := strconv.Atoi(strings.TrimSpace(string(data)))
	if err != nil || pid <= 0 {
		return 0, false
	}
	if pid == os.Getpid() {
		return pid, true
	}
	err = syscall.Kill(pid, 0)
	return pid, err == nil || errors.Is(err, syscall.EPERM)
}
