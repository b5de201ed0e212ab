package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// copyDemo copies demo files into a fresh folder and returns it.
func copyDemo(t *testing.T, names ...string) string {
	t.Helper()
	dir := t.TempDir()
	for _, n := range names {
		b, err := os.ReadFile(filepath.Join(demoDir, n))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, filepath.Base(n)), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

type fixJSON struct {
	Files []struct {
		Path       string   `json:"path"`
		Output     *string  `json:"output"`
		Action     string   `json:"action"`
		GainDB     *float64 `json:"gain_db"`
		LimitingDB *float64 `json:"limiting_db"`
		Before     *struct {
			Spec           string   `json:"spec"`
			Verdict        string   `json:"verdict"`
			IntegratedLUFS *float64 `json:"integrated_lufs"`
		} `json:"before"`
		After *struct {
			Path           string   `json:"path"`
			Verdict        string   `json:"verdict"`
			IntegratedLUFS *float64 `json:"integrated_lufs"`
			TruePeakDBTP   *float64 `json:"true_peak_dbtp"`
		} `json:"after"`
	} `json:"files"`
	Cautions []string `json:"cautions"`
}

// TestFixDemoJSON fixes two demo deliveries against the Harbourlight house
// spec (-23 LUFS ±0.5 LU, ≤ -2 dBTP; testdata/demo/harbourlight-radio/
// kweigh.toml): ep. 8 is 4.4 LU too loud (gain only), the promo has
// true-peak overs (limiting); ep. 7 already passes and is left alone. The
// JSON has the shape, the after records are those of the written
// files, and the exit status is 0.
func TestFixDemoJSON(t *testing.T) {
	dir := copyDemo(t, "harbourlight-radio/tidewater-evenings-ep07.wav", "harbourlight-radio/tidewater-evenings-ep08.wav", "harbourlight-radio/harbour-lights-promo.wav")
	spec := filepath.Join(demoDir, "harbourlight-radio", "kweigh.toml")
	code, out, stderr := kweigh(t, "fix", "--spec", spec, "--format", "json", dir)
	if code != exitOK {
		t.Fatalf("exit %d; stderr %s; out %s", code, stderr, out)
	}
	var doc fixJSON
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err, out)
	}
	want := map[string]string{
		"tidewater-evenings-ep07.wav": "none needed",
		"tidewater-evenings-ep08.wav": "gain",
		"harbour-lights-promo.wav":    "gain and limiting",
	}
	if len(doc.Files) != 3 || len(doc.Cautions) != 2 {
		t.Fatalf("%d files, %d cautions", len(doc.Files), len(doc.Cautions))
	}
	for _, f := range doc.Files {
		base := filepath.Base(f.Path)
		if f.Action != want[base] {
			t.Errorf("%s: action %q, want %q", base, f.Action, want[base])
		}
		if f.Before == nil || f.After == nil {
			t.Fatalf("%s: before/after missing", base)
		}
		if f.Action == "none needed" {
			if f.Output != nil || f.GainDB != nil {
				t.Errorf("%s: output %v gain %v for an untouched file", base, f.Output, f.GainDB)
			}
			continue
		}
		wantOut := filepath.Join(dir, strings.TrimSuffix(base, ".wav")+".fixed.wav")
		if f.Output == nil || *f.Output != wantOut || f.After.Path != wantOut {
			t.Errorf("%s: output %v, after path %s, want %s", base, f.Output, f.After.Path, wantOut)
		}
		if f.After.Verdict != "pass" || *f.After.IntegratedLUFS < -23.1 || *f.After.IntegratedLUFS > -22.9 || *f.After.TruePeakDBTP > -2 {
			t.Errorf("%s: after %s, %.2f LUFS, %.2f dBTP", base, f.After.Verdict, *f.After.IntegratedLUFS, *f.After.TruePeakDBTP)
		}
		if (f.LimitingDB != nil) != (f.Action == "gain and limiting") {
			t.Errorf("%s: limiting %v for action %s", base, f.LimitingDB, f.Action)
		}
	}
	// A second run finds the outputs and, without --force, refuses to
	// replace them (exit 2); the outputs themselves are not taken as
	// inputs.
	code, out, _ = kweigh(t, "fix", "--spec", spec, dir)
	if code != exitTrouble || !strings.Contains(out, "exists (use the force option") || strings.Contains(out, ".fixed.fixed") {
		t.Errorf("second run: exit %d\n%s", code, out)
	}
	if code, _, _ = kweigh(t, "fix", "--spec", spec, "--force", dir); code != exitOK {
		t.Errorf("--force: exit %d", code)
	}
}

// TestFixRefusedAndDryRun: with --max-limiting 1 the promo (about 2 dB of
// limiting needed) is refused, exit 1, with the option to allow it named;
// --dry-run writes nothing; text output carries the cautions.
func TestFixRefusedAndDryRun(t *testing.T) {
	dir := copyDemo(t, "harbourlight-radio/harbour-lights-promo.wav")
	spec := filepath.Join(demoDir, "harbourlight-radio", "kweigh.toml")
	code, out, _ := kweigh(t, "fix", "--spec", spec, "--max-limiting", "1", dir)
	if code != exitFailed || !strings.Contains(out, "REFUSED") || !strings.Contains(out, "--max-limiting 3") {
		t.Errorf("exit %d\n%s", code, out)
	}
	code, out, _ = kweigh(t, "fix", "--spec", spec, "--dry-run", dir)
	entries, _ := os.ReadDir(dir)
	if code != exitOK || len(entries) != 1 || !strings.Contains(out, "dry run, nothing written") {
		t.Errorf("dry run: exit %d, %d files\n%s", code, len(entries), out)
	}
	code, out, _ = kweigh(t, "fix", "--spec", "ebu-r128", filepath.Join(dir, "harbour-lights-promo.wav"), "--always", "--ceiling-margin", "0.3")
	if code != exitOK || !strings.Contains(out, "audition corrected files at a safe monitoring level") || !strings.Contains(out, "not the receiving party's acceptance") {
		t.Errorf("cautions: exit %d\n%s", code, out)
	}
	// Without --spec and without a kweigh.toml there is nothing to aim for:
	// the file is an error naming the way out (exit 2).
	if code, out, _ := kweigh(t, "fix", dir); code != exitTrouble || !strings.Contains(out, "no spec: give --spec") {
		t.Errorf("no spec: exit %d %s", code, out)
	}
}

// TestFixFindsFolderSpec: without --spec, fix judges and corrects each
// file against its nearest kweigh.toml, as check does (engine's spec
// search), here the outlet's spec one folder up; --jobs 2 corrects two
// files at once and the report keeps the files' order.
func TestFixFindsFolderSpec(t *testing.T) {
	top := copyDemo(t, "harbourlight-radio/kweigh.toml")
	week := filepath.Join(top, "week1")
	if err := os.Mkdir(week, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"harbour-lights-promo.wav", "tidewater-evenings-ep08.wav"} {
		b, err := os.ReadFile(filepath.Join(demoDir, "harbourlight-radio", n))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(week, n), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	code, out, _ := kweigh(t, "fix", "--format", "json", "--jobs", "2", week)
	if code != exitOK {
		t.Fatalf("exit %d\n%s", code, out)
	}
	var doc fixJSON
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Files) != 2 || !strings.HasSuffix(doc.Files[0].Path, "harbour-lights-promo.wav") || !strings.HasSuffix(doc.Files[1].Path, "tidewater-evenings-ep08.wav") {
		t.Fatalf("files %+v", doc.Files)
	}
	for _, f := range doc.Files {
		if f.Before == nil || f.Before.Spec != "harbourlight-radio" || f.After == nil || f.After.Verdict != "pass" {
			t.Errorf("%s: before %+v after %+v", f.Path, f.Before, f.After)
		}
	}
}

// TestFixHelperProcess is not a test: run as a child with KWEIGH_FIX_CHILD
// set, it is the kweigh command line (the real main path, in a process
// that can be killed).
func TestFixHelperProcess(t *testing.T) {
	if os.Getenv("KWEIGH_FIX_CHILD") == "" {
		t.Skip("helper process for TestFixInPlaceSurvivesKill")
	}
	args := strings.Split(os.Getenv("KWEIGH_FIX_CHILD"), "\x1f")
	os.Exit(run(t.Context(), append([]string{"kweigh"}, args...), os.Stdout, os.Stderr))
}

// TestFixInPlaceSurvivesKill starts a real kweigh process fixing a long
// file in place, kills it with SIGKILL while it writes the replacement (its
// temporary file has appeared and is growing), and checks that the input
// is byte for byte what it was. A run left alone then replaces it.
func TestFixInPlaceSurvivesKill(t *testing.T) {
	dir := t.TempDir()
	src, err := os.ReadFile(filepath.Join(demoDir, "harbourlight-radio", "harbour-lights-promo.wav"))
	if err != nil {
		t.Fatal(err)
	}
	// Lengthen the 8 s promo five times with sox (an independent writer)
	// when it is there, so that the write lasts long enough to be caught;
	// without sox the promo is used as it is.
	in := filepath.Join(dir, "promo.wav")
	os.WriteFile(in, src, 0o644)
	if sox, err := exec.LookPath("sox"); err == nil {
		long := filepath.Join(dir, "long.wav")
		if out, err := exec.Command(sox, in, long, "repeat", "4").CombinedOutput(); err != nil {
			t.Fatalf("sox: %v %s", err, out)
		}
		os.Rename(long, in)
	}
	orig, _ := os.ReadFile(in)
	sum := sha256.Sum256(orig)
	spec := filepath.Join(demoDir, "harbourlight-radio", "kweigh.toml")

	cmd := exec.Command(os.Args[0], "-test.run=^TestFixHelperProcess$")
	cmd.Env = append(os.Environ(), "KWEIGH_FIX_CHILD="+strings.Join([]string{"fix", "--spec", spec, "--in-place", in}, "\x1f"))
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	killed := false
	deadline := time.Now().Add(60 * time.Second)
	for time.Now().Before(deadline) && !killed {
		matches, _ := filepath.Glob(filepath.Join(dir, ".promo.wav.kweigh-*.tmp"))
		for _, m := range matches {
			if st, err := os.Stat(m); err == nil && st.Size() > 0 && st.Size() < int64(len(orig)) {
				cmd.Process.Signal(syscall.SIGKILL)
				killed = true
			}
		}
		time.Sleep(time.Millisecond)
	}
	cmd.Wait()
	if !killed {
		t.Fatalf("never saw the temporary file being written; output:\n%s", out.String())
	}
	after, err := os.ReadFile(in)
	if err != nil {
		t.Fatal(err)
	}
	if sha256.Sum256(after) != sum {
		t.Fatal("the input changed although the process was killed before the rename")
	}
	// Left to finish, the in-place fix replaces the input, leaves no other
	// file of its own, and the input now passes.
	if code, out, _ := kweigh(t, "fix", "--spec", spec, "--in-place", in); code != exitOK {
		t.Fatalf("in-place: exit %d\n%s", code, out)
	}
	if code, out, _ := kweigh(t, "check", "--spec", spec, in); code != exitOK {
		t.Errorf("the replaced file does not pass: exit %d\n%s", code, out)
	}
	left, _ := filepath.Glob(filepath.Join(dir, "*.fixed.*"))
	if len(left) != 0 {
		t.Errorf("in-place left %v", left)
	}
}
