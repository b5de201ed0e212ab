package leftovers

import (
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"testing"
)

// deadPID starts and reaps a real child process, so its PID is known to
// be gone (the kernel does not hand it out again at once).
func deadPID(t *testing.T) int {
	t.Helper()
	cmd := exec.Command("true")
	if err := cmd.Run(); err != nil {
		t.Skip("no `true` to run:", err)
	}
	return cmd.ProcessState.Pid()
}

// TestSweep: the temporaries of an ended process go; this process's, a
// live child's, and names of other shapes stay.
func TestSweep(t *testing.T) {
	dir := t.TempDir()
	dead := deadPID(t)
	live := exec.Command("sleep", "30")
	if err := live.Start(); err != nil {
		t.Skip("no `sleep` to run:", err)
	}
	t.Cleanup(func() { live.Process.Kill(); live.Wait() })

	mk := func(name string, folder bool) string {
		p := filepath.Join(dir, name)
		var err error
		if folder {
			err = os.MkdirAll(filepath.Join(p, "upload-1"), 0o700)
		} else {
			err = os.WriteFile(p, []byte("x"), 0o600)
		}
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	gone := []string{
		mk("kweigh-serve-"+strconv.Itoa(dead)+"-123", true),
		mk(".ep1.wav.kweigh-"+strconv.Itoa(dead)+"-9.tmp", false),
	}
	kept := []string{
		mk("kweigh-serve-"+strconv.Itoa(os.Getpid())+"-77", true),
		mk("kweigh-serve-"+strconv.Itoa(live.Process.Pid)+"-5", true),
		mk("kweigh-serve-notapid-5", true),
		mk("kweigh-serve-"+strconv.Itoa(dead), true), // no random part: not ours
		mk(".ep1.wav.kweigh-"+strconv.Itoa(dead)+"-9.tmp.keep", false),
		mk("ep1.wav", false),
	}
	removed := append(Sweep(dir, "kweigh-serve-", ""), Sweep(dir, ".ep1.wav.kweigh-", ".tmp")...)
	slices.Sort(removed)
	slices.Sort(gone)
	if !slices.Equal(removed, gone) {
		t.Errorf("removed %v, want %v", removed, gone)
	}
	for _, p := range gone {
		if _, err := os.Stat(p); !os.IsNotExist(err) {
			t.Errorf("%s still there", p)
		}
	}
	for _, p := range kept {
		if _, err := os.Stat(p); err != nil {
			t.Errorf("%s removed: %v", p, err)
		}
	}
}

// TestPatternRoundTrip: a name CreateTemp makes from Pattern reads back
// this process's PID.
func TestPatternRoundTrip(t *testing.T) {
	f, err := os.CreateTemp(t.TempDir(), Pattern(".take.flac.kweigh-", ".tmp"))
	if err != nil {
		t.Fatal(err)
	}
	f.Close()
	pid, ok := pidOf(filepath.Base(f.Name()), ".take.flac.kweigh-", ".tmp")
	if !ok || pid != os.Getpid() {
		t.Errorf("%s: pid %d %v", f.Name(), pid, ok)
	}
}

// TestCreateHidden: making one output's hidden temporary removes the
// hidden temporaries an ended process left in the folder for any output
// (of the same suffix), and keeps a live process's and other names.
func TestCreateHidden(t *testing.T) {
	dir := t.TempDir()
	dead := strconv.Itoa(deadPID(t))
	gone := filepath.Join(dir, ".ep2.wav.kweigh-"+dead+"-41.tmp")
	kept := []string{
		filepath.Join(dir, ".ep3.wav.kweigh-"+strconv.Itoa(os.Getpid())+"-7.tmp"),
		filepath.Join(dir, ".ep2.wav.kweigh-"+dead+"-41.part"),
		filepath.Join(dir, "ep2.wav.kweigh-"+dead+"-41.tmp"),
	}
	for _, p := range append(kept, gone) {
		if err := os.WriteFile(p, []byte("x"), 0o600); err != nil {
			t.Fatal(err)
		}
	}
	f, err := CreateHidden(dir, "ep1.wav", ".tmp")
	if err != nil {
		t.Fatal(err)
	}
	f.Close()
	if pid, ok := pidOf(filepath.Base(f.Name()), ".ep1.wav.kweigh-", ".tmp"); !ok || pid != os.Getpid() {
		t.Errorf("made %s", f.Name())
	}
	if _, err := os.Stat(gone); !os.IsNotExist(err) {
		t.Errorf("%s still there", gone)
	}
	for _, p := range kept {
		if _, err := os.Stat(p); err != nil {
			t.Errorf("%s removed: %v", p, err)
		}
	}
}
