// Package leftovers names temporary files and folders after the process
// that makes them, so that a later run can remove what a killed one left
// behind (SIGKILL, a power cut: no deferred clean-up runs) without ever
// touching the temporaries of a run still going.
//
// A temporary is named PREFIX + PID + "-" + random + SUFFIX. Sweep removes
// the entries of a folder with that prefix and suffix whose PID is no
// longer a live process. A PID reused by an unrelated process only delays
// the sweep; it never removes a live run's files.
package leftovers

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
)

// Pattern is the os.CreateTemp / os.MkdirTemp pattern for a temporary of
// this process: prefix, the PID, a dash, the random part ("*") and suffix.
func Pattern(prefix, suffix string) string {
	return prefix + strconv.Itoa(os.Getpid()) + "-*" + suffix
}

// Sweep removes from dir the files and folders named by Pattern(prefix,
// suffix) in a process that has ended. It returns the names it removed;
// entries it cannot read or remove are left as they are (a sweep is a
// courtesy, never a reason to fail a run).
func Sweep(dir, prefix, suffix string) []string {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var removed []string
	for _, e := range entries {
		pid, ok := pidOf(e.Name(), prefix, suffix)
		if !ok || pid == os.Getpid() || alive(pid) {
			continue
		}
		path := filepath.Join(dir, e.Name())
		if err := os.RemoveAll(path); err == nil {
			removed = append(removed, path)
		}
	}
	return removed
}

// pidOf reads the PID out of a name made by Pattern(prefix, suffix).
func pidOf(name, prefix, suffix string) (int, bool) {
	rest, ok := strings.CutPrefix(name, prefix)
	if !ok {
		return 0, false
	}
	if rest, ok = strings.CutSuffix(rest, suffix); !ok {
		return 0, false
	}
	digits, random, ok := strings.Cut(rest, "-")
	if !ok || digits == "" || random == "" || len(digits) > 10 || digits[0] == '0' || strings.Trim(digits, "0123456789") != "" {
		return 0, false
	}
	pid, err := strconv.Atoi(digits)
	if err != nil || pid <= 0 {
		return 0, false
	}
	return pid, true
}

// hiddenMarker separates the file name from the PID in a hidden
// temporary made by CreateHidden: ".NAME.kweigh-PID-RANDOM" + suffix.
const hiddenMarker = ".kweigh-"

// swept holds the folders (and suffixes) CreateHidden has swept in this
// process: one sweep per folder, not one per file written into it (a run
// writing a plot per file would otherwise read the folder once per plot).
var swept sync.Map

// CreateHidden creates the hidden temporary file of an output called base
// in dir, ".BASE.kweigh-PID-RANDOM" + suffix, after removing (once per
// folder and suffix in this process) the hidden temporaries of that shape
// left there by processes that have ended, whatever output they were for.
func CreateHidden(dir, base, suffix string) (*os.File, error) {
	if _, done := swept.LoadOrStore(dir+"\x00"+suffix, true); !done {
		sweepHidden(dir, suffix)
	}
	return os.CreateTemp(dir, Pattern("."+base+hiddenMarker, suffix))
}

// sweepHidden removes from dir the hidden files ".NAME.kweigh-PID-…" +
// suffix whose process has ended.
func sweepHidden(dir, suffix string) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return
	}
	for _, e := range entries {
		name := e.Name()
		at := strings.LastIndex(name, hiddenMarker)
		if !strings.HasPrefix(name, ".") || at < 1 {
			continue
		}
		pid, ok := pidOf(name[at:], hiddenMarker, suffix)
		if !ok || pid == os.Getpid() || alive(pid) {
			continue
		}
		os.Remove(filepath.Join(dir, name))
	}
}
