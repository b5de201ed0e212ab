package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// copyTree copies the demo deliveries (audio and kweigh.toml files) into dst.
func copyTree(t *testing.T, src, dst string) {
	t.Helper()
	err := filepath.Walk(src, func(p string, info os.FileInfo, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(src, p)
		if info.IsDir() {
			return os.MkdirAll(filepath.Join(dst, rel), 0o755)
		}
		copyFile(t, p, filepath.Join(dst, rel))
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
}

// TestWatchOnceMatchesCheck: `watch --once` over a copy of the demo gives
// every file the verdict `check` gives it (same engine, same folder specs),
// sorts the files into passed and failed, exits with check's status, and
// `history` lists what the ledger holds in every format.
func TestWatchOnceMatchesCheck(t *testing.T) {
	_, checkOut, _ := kweigh(t, "check", "--format", "jsonl", demoDir)
	want := map[string]string{} // path below the demo → verdict
	for _, line := range strings.Split(strings.TrimSpace(checkOut), "\n") {
		var r struct{ Path, Verdict string }
		if err := json.Unmarshal([]byte(line), &r); err != nil {
			t.Fatalf("check line %q: %v", line, err)
		}
		rel, _ := filepath.Rel(demoDir, r.Path)
		want[filepath.ToSlash(rel)] = r.Verdict
	}
	if len(want) != 11 {
		t.Fatalf("check reported %d demo files, want 11", len(want))
	}

	root := t.TempDir()
	inbox, passed, failed := filepath.Join(root, "drop"), filepath.Join(root, "passed"), filepath.Join(root, "failed")
	copyTree(t, demoDir, inbox)
	code, out, errOut := kweigh(t, "watch", "--once", "--settle", "100ms", "--passed", passed, "--failed", failed, inbox)
	if code != exitTrouble { // the demo's broken archive interview
		t.Errorf("watch --once exit %d, want %d (a file could not be judged)\n%s", code, exitTrouble, errOut)
	}
	if !strings.Contains(errOut, "level=INFO msg=taken") || !strings.Contains(errOut, "time=") {
		t.Errorf("stderr has no timestamped log lines:\n%s", errOut)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != len(want) {
		t.Fatalf("%d lines on stdout, want %d:\n%s", len(lines), len(want), out)
	}
	for _, line := range lines {
		var r struct {
			Path, Verdict string
			PlacedAt      string `json:"placed_at"`
			PlacedPath    string `json:"placed_path"`
		}
		if err := json.Unmarshal([]byte(line), &r); err != nil {
			t.Fatalf("line %q: %v", line, err)
		}
		rel, _ := filepath.Rel(inbox, r.Path)
		rel = filepath.ToSlash(rel)
		if r.Verdict != want[rel] {
			t.Errorf("%s: watch says %s, check says %s", rel, r.Verdict, want[rel])
		}
		dir := passed
		if r.Verdict == "fail" || r.Verdict == "error" {
			dir = failed
		}
		if r.PlacedPath != filepath.Join(dir, filepath.FromSlash(rel)) {
			t.Errorf("%s placed at %s", rel, r.PlacedPath)
		}
		if _, err := time.Parse(time.RFC3339Nano, r.PlacedAt); err != nil {
			t.Errorf("%s: placed_at %q: %v", rel, r.PlacedAt, err)
		}
	}

	// Run again: everything is placed, nothing to do.
	if code, out, _ := kweigh(t, "watch", "--once", "--settle", "100ms", "--passed", passed, "--failed", failed, inbox); code != exitOK || out != "" {
		t.Errorf("second run: exit %d, output %q", code, out)
	}

	state := filepath.Join(inbox, ".kweigh")
	code, jsonOut, _ := kweigh(t, "history", "--state", state, "--format", "json")
	var doc struct {
		Files []struct {
			File       string  `json:"file"`
			Verdict    *string `json:"verdict"`
			State      string  `json:"state"`
			PlacedPath *string `json:"placed_path"`
			ReportJSON *string `json:"report_json"`
		} `json:"files"`
	}
	if err := json.Unmarshal([]byte(jsonOut), &doc); err != nil || code != exitOK {
		t.Fatalf("history json: exit %d, %v\n%s", code, err, jsonOut)
	}
	if len(doc.Files) != len(want) {
		t.Errorf("history lists %d files, want %d", len(doc.Files), len(want))
	}
	for _, f := range doc.Files {
		rel, _ := filepath.Rel(inbox, f.File)
		if f.Verdict == nil || *f.Verdict != want[filepath.ToSlash(rel)] || f.State != "placed" || f.PlacedPath == nil {
			t.Errorf("history row %+v", f)
		}
		if f.ReportJSON == nil {
			t.Errorf("%s: no report", f.File)
		} else if _, err := os.Stat(*f.ReportJSON); err != nil {
			t.Errorf("%s: %v", f.File, err)
		}
	}
	_, jsonl, _ := kweigh(t, "history", inbox, "--format", "jsonl")
	if n := len(strings.Split(strings.TrimSpace(jsonl), "\n")); n != len(want) {
		t.Errorf("history jsonl: %d lines", n)
	}
	_, csvOut, _ := kweigh(t, "history", "--state", state, "--format", "csv")
	rows, err := csv.NewReader(strings.NewReader(csvOut)).ReadAll()
	if err != nil || len(rows) != len(want)+1 || rows[0][0] != "file" {
		t.Errorf("history csv: %d rows, %v", len(rows), err)
	}
	_, text, _ := kweigh(t, "history", "--state", state)
	if !strings.Contains(text, "WHEN") || !strings.Contains(text, "tidewater-evenings-ep07.wav") || !strings.Contains(text, passed) {
		t.Errorf("history text:\n%s", text)
	}
	_, none, _ := kweigh(t, "history", "--state", state, "--since", time.Now().Add(time.Hour).UTC().Format(time.RFC3339), "--format", "jsonl")
	if strings.TrimSpace(none) != "" {
		t.Errorf("history --since an hour ahead listed: %s", none)
	}
	if code, _, errOut := kweigh(t, "history", "--state", state, "--since", "last tuesday"); code != exitTrouble || !strings.Contains(errOut, "--since") {
		t.Errorf("bad --since: exit %d, %s", code, errOut)
	}
}

// TestWatchOnceExitStatus: check's statuses — 0 when everything passed, 1
// when a file failed — and usage errors.
func TestWatchOnceExitStatus(t *testing.T) {
	for _, c := range []struct {
		folder string
		want   int
	}{
		{"quillbrook-stream", exitOK},      // one pass, one warning (demo README)
		{"northgate-podcasts", exitFailed}, // one pass, two failures
	} {
		inbox := t.TempDir()
		copyTree(t, filepath.Join(demoDir, c.folder), inbox)
		if code, _, errOut := kweigh(t, "watch", "--once", "--settle", "50ms", "--format", "text", inbox); code != c.want {
			t.Errorf("%s: exit %d, want %d\n%s", c.folder, code, c.want, errOut)
		}
	}
	if code, _, _ := kweigh(t, "watch", "--once"); code != exitTrouble {
		t.Errorf("no inbox: exit %d", code)
	}
	if code, _, errOut := kweigh(t, "watch", "--once", "--format", "csv", t.TempDir()); code != exitTrouble || !strings.Contains(errOut, "jsonl or text") {
		t.Errorf("bad format: exit %d %s", code, errOut)
	}
	if code, _, _ := kweigh(t, "watch", "--once", filepath.Join(t.TempDir(), "missing")); code != exitTrouble {
		t.Errorf("missing inbox: exit %d", code)
	}
}
