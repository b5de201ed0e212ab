package watch

import (
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestTemporary: names upload and download tools use while writing (common
// practice, no published source) and the user's patterns are left alone.
func TestTemporary(t *testing.T) {
	n, err := NewNames([]string{"*.bak", "scratch/*"})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		rel  string
		want bool
	}{
		{"ep1.wav", false},
		{"show/ep1.wav", false},
		{".ep1.wav", true},           // hidden (rsync's temporary, macOS ._ files)
		{".sync/ep1.wav", true},      // inside a hidden folder
		{"ep1.wav.part", true},       // browsers, many FTP clients
		{"ep1.wav.PARTIAL", true},    // case does not matter
		{"ep1.wav.tmp", true},        // scripts
		{"ep1.wav.crdownload", true}, // Chromium
		{"ep1.wav.filepart", true},   // WinSCP
		{"kweigh.toml", true},        // a folder's spec is not a delivery
		{"show/kweigh.toml", true},
		{"ep1.bak", true},         // --ignore by base name
		{"scratch/ep1.wav", true}, // --ignore by path
		{"other/scratch.wav", false},
		{"ep1.participants.wav", false},
	} {
		if got := n.Temporary(c.rel); got != c.want {
			t.Errorf("Temporary(%q) = %v, want %v", c.rel, got, c.want)
		}
	}
	if _, err := NewNames([]string{"[unclosed"}); err == nil {
		t.Error("a bad --ignore pattern was accepted")
	}
}

func TestNumbered(t *testing.T) {
	for _, c := range []struct {
		rel  string
		n    int
		want string
	}{
		{"ep1.wav", 1, "ep1.wav"},
		{"ep1.wav", 2, "ep1 (2).wav"},
		{"show/ep1.wav", 3, "show/ep1 (3).wav"},
		{"show/README", 2, "show/README (2)"},
		{"a.b/ep.final.wav", 2, "a.b/ep.final (2).wav"},
	} {
		if got := numbered(c.rel, c.n); got != c.want {
			t.Errorf("numbered(%q, %d) = %q, want %q", c.rel, c.n, got, c.want)
		}
	}
}

func TestPlacedRecord(t *testing.T) {
	at := time.Date(2026, 12, 1, 21, 0, 0, 5, time.UTC)
	got := placedRecord([]byte(`{"path":"in/ep1.wav","verdict":"pass"}`), at, "/qc/passed/ep1.wav")
	var m map[string]any
	if err := json.Unmarshal(got, &m); err != nil {
		t.Fatalf("%s: %v", got, err)
	}
	if m["placed_at"] != "2026-12-01T21:00:00.000000005Z" || m["placed_path"] != "/qc/passed/ep1.wav" || m["verdict"] != "pass" {
		t.Errorf("placedRecord = %s", got)
	}
	if got := placedRecord([]byte(`{"path":"x"}`), at, ""); !strings.HasSuffix(string(got), `"placed_path":null}`) {
		t.Errorf("a file that stays: %s", got)
	}
}

// TestMoveFile: never overwrites, moves across file systems by copying,
// and a repeated move (after a crash) is done when the destination exists
// with the right size.
func TestMoveFile(t *testing.T) {
	dirs := []string{t.TempDir()}
	if d, err := os.MkdirTemp("/dev/shm", "kweigh-move"); err == nil {
		t.Cleanup(func() { os.RemoveAll(d) })
		dirs = append(dirs, d)
	}
	for _, outDir := range dirs {
		src := filepath.Join(t.TempDir(), "ep1.wav")
		data := wavBytes(0.1, passDBFS)
		os.WriteFile(src, data, 0o644)
		dst := filepath.Join(outDir, "passed", "show", "ep1.wav")

		// A different file already at the destination: a clash, nothing
		// touched.
		os.MkdirAll(filepath.Dir(dst), 0o755)
		os.WriteFile(dst, []byte("someone else's file"), 0o644)
		if err := moveFile(src, dst, int64(len(data))); !errors.Is(err, errClash) {
			t.Fatalf("%s: move onto another file: %v, want a clash", outDir, err)
		}
		if b, _ := os.ReadFile(dst); string(b) != "someone else's file" {
			t.Fatalf("%s: the other file was overwritten", outDir)
		}
		os.Remove(dst)

		if err := moveFile(src, dst, int64(len(data))); err != nil {
			t.Fatalf("%s: %v", outDir, err)
		}
		if b, _ := os.ReadFile(dst); string(b) != string(data) {
			t.Fatalf("%s: moved content differs", outDir)
		}
		if _, err := os.Stat(src); !errors.Is(err, os.ErrNotExist) {
			t.Fatalf("%s: source still there: %v", outDir, err)
		}
		// The state a crash after copying leaves: source and copy both
		// there. Repeating the move finishes it.
		os.WriteFile(src, data, 0o644)
		if err := moveFile(src, dst, int64(len(data))); err != nil {
			t.Fatalf("%s: repeated move: %v", outDir, err)
		}
		if _, err := os.Stat(src); !errors.Is(err, os.ErrNotExist) {
			t.Fatalf("%s: repeated move left the source", outDir)
		}
		if left := filesUnder(t, filepath.Dir(dst)); len(left) != 1 {
			t.Errorf("%s: files beside the destination: %v", outDir, left)
		}
	}
}

// TestLedger: each transition is committed (a second connection sees it at
// once) and only one process may write a state folder.
func TestLedger(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	l, err := OpenLedger(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	if _, err := OpenLedger(dir); err == nil || !strings.Contains(err.Error(), "another kweigh watch") {
		t.Fatalf("second writer: %v", err)
	}
	r, err := OpenLedgerReader(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	mtime := time.Date(2026, 11, 30, 9, 0, 0, 123456789, time.UTC)
	now := time.Now()
	id, err := l.Seen(ctx, "inbox", "show/ep1.wav", 1000, mtime, now)
	if err != nil {
		t.Fatal(err)
	}
	state := func() Entry {
		e, err := r.Get(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	steps := []struct {
		do   func() error
		want State
	}{
		{func() error { return l.Observed(ctx, id, 1000, mtime, StateSettling, now) }, StateSettling},
		{func() error {
			_, err := l.Judging(ctx, id, "ab12", func(n int) string { return numbered("show/ep1.wav", n) }, func(int) bool { return true }, now)
			return err
		}, StateJudging},
		{func() error {
			return l.Judged(ctx, id, "pass", []byte(`{}`), "reports", "passed/show/ep1.wav", "", now)
		}, StateJudged},
		{func() error {
			return l.Placed(ctx, id, "passed/show/ep1.wav", now, "http://127.0.0.1:1/hook", []byte(`{}`))
		}, StatePlaced},
	}
	for i, s := range steps {
		if err := s.do(); err != nil {
			t.Fatalf("step %d: %v", i, err)
		}
		if got := state().State; got != s.want {
			t.Fatalf("step %d: reader sees %s, want %s", i, got, s.want)
		}
	}
	e := state()
	if e.Stem != "show/ep1.wav" || e.Verdict != "pass" || e.Dest != "passed/show/ep1.wav" || !e.ModTime.Equal(mtime) || e.PlacedAt.IsZero() {
		t.Errorf("row = %+v", e)
	}
	if n, _ := r.PendingNotifications(ctx); n != 1 {
		t.Errorf("placing with a webhook queued %d notifications, want 1", n)
	}
	// The next version of the same name gets the next numbered stem.
	id2, _ := l.Seen(ctx, "inbox", "show/ep1.wav", 2000, mtime.Add(time.Second), now)
	stem, err := l.Judging(ctx, id2, "cd34", func(n int) string { return numbered("show/ep1.wav", n) }, func(n int) bool { return n != 2 }, now)
	if err != nil || stem != "show/ep1 (3).wav" { // 1 is held by the first version, 2 is taken on disk
		t.Errorf("second version's stem %q, %v", stem, err)
	}
	if v, ok, _ := l.Version(ctx, "inbox", "show/ep1.wav", 1000, mtime); !ok || v.ID != id {
		t.Errorf("Version found %+v, %v", v, ok)
	}
}

// TestReplacedInPlace: without --passed/--failed files stay; a file
// replaced with new content is a new version, judged again with its own
// report pair; a file that vanishes before it settles is recorded gone.
func TestReplacedInPlace(t *testing.T) {
	inbox := t.TempDir()
	p := filepath.Join(inbox, "ep1.wav")
	writeWAV(t, p, 1, passDBFS)
	out := &lines{}
	w := start(t, Options{Inboxes: []string{inbox}, Settle: 500 * time.Millisecond, Rescan: 100 * time.Millisecond,
		Judge: testJudge(t), Output: out, Poll: 100 * time.Millisecond})
	waitFor(t, "first version judged", 10*time.Second, func() bool { return len(out.records(t)) == 1 })
	time.Sleep(700 * time.Millisecond) // rescans see it again: not judged twice
	writeWAV(t, p, 1.2, failDBFS)
	waitFor(t, "second version judged", 10*time.Second, func() bool { return len(out.records(t)) == 2 })
	writeWAV(t, filepath.Join(inbox, "brief.wav"), 1, passDBFS)
	time.Sleep(250 * time.Millisecond) // seen by a rescan (every 100 ms), far from settled (500 ms)
	os.Remove(filepath.Join(inbox, "brief.wav"))
	time.Sleep(time.Second)
	w.stop(t)

	recs := out.records(t)
	if len(recs) != 2 || recs[0]["verdict"] != "pass" || recs[1]["verdict"] != "fail" || recs[1]["placed_path"] != nil {
		t.Fatalf("records: %d, verdicts %v then %v", len(recs), recs[0]["verdict"], recs[1]["verdict"])
	}
	if _, err := os.Stat(p); err != nil {
		t.Errorf("the file did not stay: %v", err)
	}
	reports := filesUnder(t, filepath.Join(inbox, ".kweigh", "reports"))
	if strings.Join(reports, ",") != "ep1 (2).wav.html,ep1 (2).wav.json,ep1.wav.html,ep1.wav.json" {
		t.Errorf("reports: %v", reports)
	}
	rows := ledgerRows(t, filepath.Join(inbox, ".kweigh"))
	var states []string
	for _, e := range rows {
		states = append(states, e.Rel+":"+string(e.State))
	}
	if strings.Join(states, ",") != "ep1.wav:placed,ep1.wav:placed,brief.wav:gone" {
		t.Errorf("ledger: %v", states)
	}
}
