package queue_test

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/internal/natstest"
	"github.com/kweigh/kweigh/queue"
)

// TestAudioExpires: uploads live Dial.AudioMaxAge in the bucket, not for
// ever; an upload that finds its object past half that age sends it again
// (so a job always has half the lifetime left), and a job whose audio has
// gone ends in an error result that says so rather than a lost result.
func TestAudioExpires(t *testing.T) {
	srv := natstest.Start(t, t.TempDir())
	const prefix, age = "EXP", 2 * time.Second
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
	defer cancel()
	q, err := queue.Connect(ctx, queue.Dial{URL: srv.URL, Prefix: prefix, AudioMaxAge: age})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(q.Close)

	path := filepath.Join(t.TempDir(), "ep7.wav")
	a := audiotest.DBFS(-20)
	if err := os.WriteFile(path, audiotest.PCMWAV(48000, 2, 16, audiotest.Sine(48000, 1, 997, a, a)), 0o644); err != nil {
		t.Fatal(err)
	}
	upload := func() (string, bool) {
		t.Helper()
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		obj, _, sent, err := q.Upload(ctx, path, f)
		if err != nil {
			t.Fatal(err)
		}
		return obj, sent
	}
	obj, sent := upload()
	if !sent {
		t.Fatal("first upload not sent")
	}
	if _, sent := upload(); sent {
		t.Error("an upload of a fresh object sent it again")
	}
	time.Sleep(age/2 + 200*time.Millisecond)
	if _, sent := upload(); !sent {
		t.Error("an object past half its lifetime was not sent again")
	}

	// Let it expire (the server's expiry timer runs about once a second).
	info, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	time.Sleep(age + 1500*time.Millisecond)
	batch := queue.NewBatch()
	job := queue.Job{Batch: batch, Name: path, Object: obj, Size: info.Size(), Explicit: true, Spec: queue.SpecRef{Builtin: "podcast"}}
	if err := q.Publish(ctx, job); err != nil {
		t.Fatal(err)
	}
	startWorkers(t, srv.URL, prefix, 1, func(int) queue.Config {
		return queue.Config{Name: "worker-a", AckWait: 5 * time.Second}
	})
	got := collect(t, q, batch, 1, 30*time.Second)
	m := got[0].Record.Measurement
	if m == nil || !strings.Contains(m.Error, "no longer in") || !strings.Contains(m.Error, "submit the file again") {
		t.Errorf("job on expired audio: measurement %+v, want its error to say the audio is no longer in the bucket", m)
	}
}
