package watch

import (
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestInbox runs the watcher on a real folder, with file-system events and
// in polling mode, through the ways files arrive: present at the start,
// copied in, renamed in, written slowly in chunks, under a temporary name
// and then renamed, in a sub-folder made after the start, replaced with new
// content, unreadable, not audio, not a regular file.
func TestInbox(t *testing.T) {
	for _, mode := range []string{"events", "poll"} {
		t.Run(mode, func(t *testing.T) { testInbox(t, mode) })
	}
}

func testInbox(t *testing.T, mode string) {
	root := t.TempDir()
	inbox, passed, failed, stage := filepath.Join(root, "inbox"), filepath.Join(root, "passed"), filepath.Join(root, "failed"), filepath.Join(root, "stage")
	for _, d := range []string{inbox, stage} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	const settle = 600 * time.Millisecond
	writeWAV(t, filepath.Join(inbox, "early.wav"), 1, passDBFS)
	out := &lines{}
	o := Options{
		Inboxes: []string{inbox}, Passed: passed, Failed: failed, Settle: settle, Jobs: 2,
		Judge: testJudge(t), Output: out, NotifyBackoff: 50 * time.Millisecond,
	}
	if mode == "poll" {
		o.Poll = 150 * time.Millisecond
	} else {
		o.Rescan = time.Hour // events alone must do it
	}
	w := start(t, o)
	recs := func() map[string][]map[string]any { return byPath(t, out.records(t), inbox) }
	has := func(rel string, n int) func() bool { return func() bool { return len(recs()[rel]) >= n } }

	waitFor(t, "early.wav placed", 10*time.Second, has("early.wav", 1))

	// Copied in, renamed in.
	writeWAV(t, filepath.Join(inbox, "copied.wav"), 1, failDBFS)
	writeWAV(t, filepath.Join(stage, "renamed.wav"), 1, passDBFS)
	if err := os.Rename(filepath.Join(stage, "renamed.wav"), filepath.Join(inbox, "renamed.wav")); err != nil {
		t.Fatal(err)
	}

	// Temporary names are left alone, however long they sit.
	writeWAV(t, filepath.Join(inbox, "upload.wav.part"), 1, passDBFS)
	writeWAV(t, filepath.Join(inbox, ".hidden.wav"), 1, passDBFS)
	writeWAV(t, filepath.Join(inbox, "download.crdownload"), 1, passDBFS)
	os.WriteFile(filepath.Join(inbox, "notes.txt"), []byte("running order for the Quayside Sessions\n"), 0o644)
	os.WriteFile(filepath.Join(inbox, "garbage.wav"), []byte("RIFF but nothing a decoder can use, really"), 0o644)
	if err := syscall.Mkfifo(filepath.Join(inbox, "pipe.wav"), 0o644); err != nil {
		t.Fatal(err)
	}
	locked := os.Geteuid() != 0 // root reads a mode-000 file anyway
	if locked {
		writeWAV(t, filepath.Join(inbox, "locked.wav"), 1, passDBFS)
		os.Chmod(filepath.Join(inbox, "locked.wav"), 0)
	}

	// A slow writer: 2.4 s of audio in 24 chunks, 100 ms apart (each gap a
	// sixth of the settle time, margin for a loaded CI machine), header
	// first as a copy tool writes it.
	slowData := wavBytes(2.4, passDBFS)
	slowDone := make(chan error, 1)
	go func() {
		f, err := os.Create(filepath.Join(inbox, "slow.wav"))
		if err != nil {
			slowDone <- err
			return
		}
		chunk := (len(slowData) + 23) / 24
		for off := 0; off < len(slowData); off += chunk {
			if _, err := f.Write(slowData[off:min(off+chunk, len(slowData))]); err != nil {
				slowDone <- err
				return
			}
			time.Sleep(100 * time.Millisecond)
		}
		slowDone <- f.Close()
	}()

	// A sub-folder made after the start, with a file written at once (before
	// any watch on the new folder can exist).
	if err := os.MkdirAll(filepath.Join(inbox, "show", "s1"), 0o755); err != nil {
		t.Fatal(err)
	}
	writeWAV(t, filepath.Join(inbox, "show", "s1", "deep.wav"), 1, passDBFS)

	if err := <-slowDone; err != nil {
		t.Fatal(err)
	}
	waitFor(t, "copied, renamed, garbage, deep and slow placed", 15*time.Second, func() bool {
		r := recs()
		return len(r["copied.wav"]) > 0 && len(r["renamed.wav"]) > 0 && len(r["garbage.wav"]) > 0 &&
			len(r["show/s1/deep.wav"]) > 0 && len(r["slow.wav"]) > 0 && (!locked || len(r["locked.wav"]) > 0)
	})
	time.Sleep(3 * settle)
	if r := recs(); len(r["upload.wav.part"])+len(r["upload.wav"])+len(r[".hidden.wav"])+len(r["download.crdownload"]) > 0 {
		t.Fatalf("a temporary name was taken: %v", keys(r))
	}
	if err := os.Rename(filepath.Join(inbox, "upload.wav.part"), filepath.Join(inbox, "upload.wav")); err != nil {
		t.Fatal(err)
	}
	// The same name delivered again with new content: a new version.
	writeWAV(t, filepath.Join(inbox, "early.wav"), 1.5, failDBFS)
	waitFor(t, "upload.wav and the second early.wav placed", 10*time.Second, func() bool {
		return has("upload.wav", 1)() && has("early.wav", 2)()
	})
	time.Sleep(2 * settle) // nothing else may arrive
	sum := w.stop(t)

	want := map[string][]string{ // verdicts in order of placement
		"early.wav": {"pass", "fail"}, "copied.wav": {"fail"}, "renamed.wav": {"pass"}, "upload.wav": {"pass"},
		"slow.wav": {"pass"}, "show/s1/deep.wav": {"pass"}, "garbage.wav": {"error"},
	}
	if locked {
		want["locked.wav"] = []string{"error"}
	}
	got := recs()
	if len(got) != len(want) {
		t.Errorf("files reported: got %d %v, want %d", len(got), keys(got), len(want))
	}
	placedPaths := map[string]bool{}
	for rel, verdicts := range want {
		rs := got[rel]
		if len(rs) != len(verdicts) {
			t.Errorf("%s: %d records, want %d", rel, len(rs), len(verdicts))
			continue
		}
		for i, r := range rs {
			if r["verdict"] != verdicts[i] {
				t.Errorf("%s #%d: verdict %v, want %s", rel, i+1, r["verdict"], verdicts[i])
			}
			at, err := time.Parse(time.RFC3339Nano, str(r["placed_at"]))
			if err != nil || time.Since(at) > time.Minute {
				t.Errorf("%s: placed_at %v: %v", rel, r["placed_at"], err)
			}
			dest := str(r["placed_path"])
			dir := passed
			if verdicts[i] == "fail" || verdicts[i] == "error" {
				dir = failed
			}
			if !strings.HasPrefix(dest, dir+string(filepath.Separator)) {
				t.Errorf("%s: placed at %q, want under %s", rel, dest, dir)
			}
			if _, err := os.Stat(dest); err != nil {
				t.Errorf("%s: %v", rel, err)
			}
			if placedPaths[dest] {
				t.Errorf("%s: two files placed at %s", rel, dest)
			}
			placedPaths[dest] = true
		}
	}
	// The slow file was judged once, whole: its duration is the full 2.4 s.
	if rs := got["slow.wav"]; len(rs) == 1 {
		if d, _ := rs[0]["duration_s"].(float64); d < 2.399 || d > 2.401 {
			t.Errorf("slow.wav judged over %v s, want 2.4 s (the whole file)", rs[0]["duration_s"])
		}
	}
	// The new content under the old name went beside, not over, the first.
	if p := str(got["early.wav"][1]["placed_path"]); filepath.Base(p) != "early (2).wav" {
		t.Errorf("second early.wav placed at %s, want early (2).wav", p)
	}

	// Left in the inbox: only what is not a delivery.
	var left []string
	for _, f := range filesUnder(t, inbox) {
		if !strings.HasPrefix(f, ".kweigh/") {
			left = append(left, f)
		}
	}
	slices.Sort(left)
	if wantLeft := []string{".hidden.wav", "download.crdownload", "notes.txt"}; !slices.Equal(left, wantLeft) {
		t.Errorf("left in the inbox: %v, want %v", left, wantLeft)
	}

	// One report pair per placed file, named after where it went.
	rows := ledgerRows(t, filepath.Join(inbox, ".kweigh"))
	placed := 0
	for _, e := range rows {
		if e.State != StatePlaced {
			if e.State != StateGone {
				t.Errorf("ledger row %s left in state %s", e.Rel, e.State)
			}
			continue
		}
		if e.Verdict == VerdictSkipped {
			if e.Rel != "notes.txt" {
				t.Errorf("%s skipped", e.Rel)
			}
			continue
		}
		placed++
		for _, ext := range []string{".json", ".html"} {
			p := filepath.Join(inbox, ".kweigh", "reports", filepath.FromSlash(e.Stem)+ext)
			data, err := os.ReadFile(p)
			if err != nil {
				t.Errorf("%s: report: %v", e.Rel, err)
				continue
			}
			if ext == ".json" {
				var rec map[string]any
				if err := json.Unmarshal(data, &rec); err != nil || rec["verdict"] != e.Verdict {
					t.Errorf("%s: report %s: verdict %v, ledger %s (%v)", e.Rel, p, rec["verdict"], e.Verdict, err)
				}
			} else if !strings.Contains(string(data), "<html") {
				t.Errorf("%s: %s is not an HTML page", e.Rel, p)
			}
		}
		if len(e.Fingerprint) != 64 && e.Rel != "locked.wav" {
			t.Errorf("%s: fingerprint %q", e.Rel, e.Fingerprint)
		}
	}
	if n := len(filesUnder(t, filepath.Join(inbox, ".kweigh", "reports"))); n != 2*placed {
		t.Errorf("%d report files for %d placed files", n, placed)
	}
	wantFiles := 0
	for _, v := range want {
		wantFiles += len(v)
	}
	if placed != wantFiles || sum.Files != wantFiles {
		t.Errorf("ledger has %d placed files, summary %d, want %d", placed, sum.Files, wantFiles)
	}
}

func str(v any) string { s, _ := v.(string); return s }

func keys[V any](m map[string]V) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	slices.Sort(out)
	return out
}
