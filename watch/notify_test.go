package watch

import (
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"sync"
	"testing"
	"time"
)

// receiver is a loopback webhook that refuses requests while down, then
// refuses the next `refuse` ones, then accepts.
type receiver struct {
	mu       sync.Mutex
	down     bool
	refuse   int
	requests int
	accepted map[string]int // file path → accepted deliveries
	ids      map[string]bool
}

func (r *receiver) ServeHTTP(w http.ResponseWriter, req *http.Request) {
	body, _ := io.ReadAll(io.LimitReader(req.Body, 1<<20))
	r.mu.Lock()
	defer r.mu.Unlock()
	r.requests++
	if r.down || r.refuse > 0 {
		if !r.down {
			r.refuse--
		}
		http.Error(w, "receiver is down for maintenance", http.StatusServiceUnavailable)
		return
	}
	var rec map[string]any
	if err := json.Unmarshal(body, &rec); err != nil || rec["placed_at"] == nil || rec["verdict"] == nil {
		http.Error(w, "not a placed record", http.StatusBadRequest)
		return
	}
	r.accepted[str(rec["path"])]++
	r.ids[req.Header.Get(NotificationHeader)] = true
}

func (r *receiver) snapshot() (requests int, accepted map[string]int) {
	r.mu.Lock()
	defer r.mu.Unlock()
	accepted = map[string]int{}
	for k, v := range r.accepted {
		accepted[k] = v
	}
	return r.requests, accepted
}

// TestNotifyOutbox: with the receiver down, notifications wait in the
// ledger's outbox; after a restart, with the receiver refusing its first
// requests, they are retried with backoff until each has arrived exactly
// once.
func TestNotifyOutbox(t *testing.T) {
	recv := &receiver{down: true, accepted: map[string]int{}, ids: map[string]bool{}}
	srv := httptest.NewServer(recv) // 127.0.0.1
	defer srv.Close()

	inbox := t.TempDir()
	files := []string{"ep1.wav", "ep2.wav", "sub/ep3.wav"}
	for i, f := range files {
		db := passDBFS
		if i == 1 {
			db = failDBFS
		}
		writeWAV(t, filepath.Join(inbox, f), 1, db)
	}
	out := &lines{}
	o := Options{
		Inboxes: []string{inbox}, Settle: 200 * time.Millisecond, Rescan: 200 * time.Millisecond, Jobs: 2,
		Judge: testJudge(t), Output: out, Notify: srv.URL + "/qc/deliveries",
		NotifyBackoff: 50 * time.Millisecond, NotifyBackoffMax: 200 * time.Millisecond,
	}
	state := filepath.Join(inbox, ".kweigh")

	first := start(t, o)
	waitFor(t, "three files placed and each notification tried", 15*time.Second, func() bool {
		n, _ := recv.snapshot()
		return len(out.records(t)) == len(files) && n >= 2*len(files)
	})
	first.stop(t)
	if _, acc := recv.snapshot(); len(acc) != 0 {
		t.Fatalf("accepted while down: %v", acc)
	}
	if n := pending(t, state); n != len(files) {
		t.Fatalf("outbox holds %d notifications after the first run, want %d", n, len(files))
	}

	// Restart with the receiver back but refusing its first two requests.
	recv.mu.Lock()
	recv.down, recv.refuse = false, 2
	recv.mu.Unlock()
	out2 := &lines{}
	o.Output = out2
	second := start(t, o)
	waitFor(t, "every notification delivered", 15*time.Second, func() bool {
		_, acc := recv.snapshot()
		return len(acc) == len(files)
	})
	time.Sleep(500 * time.Millisecond) // room for a duplicate to show up
	second.stop(t)

	_, acc := recv.snapshot()
	for _, f := range files {
		if n := acc[filepath.Join(inbox, f)]; n != 1 {
			t.Errorf("%s: delivered %d times, want exactly once", f, n)
		}
	}
	if len(recv.ids) != len(files) {
		t.Errorf("notification ids %v, want %d distinct", recv.ids, len(files))
	}
	if n := pending(t, state); n != 0 {
		t.Errorf("outbox still holds %d notifications", n)
	}
	if n := len(out2.records(t)); n != 0 {
		t.Errorf("the restart judged %d files again", n)
	}
}

func pending(t *testing.T, state string) int {
	t.Helper()
	l, err := OpenLedgerReader(state)
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	n, err := l.PendingNotifications(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// TestBackoff: the retry wait doubles from the base up to the ceiling.
func TestBackoff(t *testing.T) {
	base, ceiling := time.Second, 10*time.Second
	for _, c := range []struct {
		attempts int
		want     time.Duration
	}{{0, time.Second}, {1, 2 * time.Second}, {2, 4 * time.Second}, {3, 8 * time.Second}, {4, 10 * time.Second}, {60, 10 * time.Second}} {
		if got := backoff(base, ceiling, c.attempts); got != c.want {
			t.Errorf("backoff after %d attempts = %v, want %v", c.attempts, got, c.want)
		}
	}
}

// TestNotifyOnce: with --once every pending notification gets one attempt
// at the end; one the receiver refuses stays in the outbox for the next
// run, which delivers it.
func TestNotifyOnce(t *testing.T) {
	recv := &receiver{refuse: 1, accepted: map[string]int{}, ids: map[string]bool{}}
	srv := httptest.NewServer(recv)
	defer srv.Close()
	inbox := t.TempDir()
	writeWAV(t, filepath.Join(inbox, "ep1.wav"), 1, passDBFS)
	o := Options{Inboxes: []string{inbox}, Settle: 50 * time.Millisecond, Once: true, Judge: testJudge(t), Notify: srv.URL}
	if sum, err := Run(context.Background(), o); err != nil || sum.Passed != 1 {
		t.Fatalf("first run: %+v %v", sum, err)
	}
	state := filepath.Join(inbox, ".kweigh")
	if n := pending(t, state); n != 1 {
		t.Fatalf("after a refused attempt %d pending, want 1", n)
	}
	if sum, err := Run(context.Background(), o); err != nil || sum.Files != 0 {
		t.Fatalf("second run: %+v %v", sum, err)
	}
	if n := pending(t, state); n != 0 {
		t.Errorf("after the second run %d pending", n)
	}
	if _, acc := recv.snapshot(); acc[filepath.Join(inbox, "ep1.wav")] != 1 {
		t.Errorf("accepted: %v", acc)
	}
}
