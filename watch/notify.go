package watch

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"net/http"
	"strconv"
	"time"
)

// notifyClient posts notifications; a receiver that does not answer in
// time counts as down and is tried again later.
var notifyClient = &http.Client{Timeout: 15 * time.Second}

// NotificationHeader carries the outbox id of a notification, so a receiver
// can recognise a repeat: a delivery whose answer was lost (a crash between
// the receiver's reply and the ledger's commit) is posted again.
const NotificationHeader = "Kweigh-Notification-Id"

// notifier delivers the outbox until ctx is cancelled: what is due now,
// then it sleeps until the next retry is due or a new file is placed.
func (w *watcher) notifier(ctx context.Context) {
	for {
		w.deliverDue(ctx, time.Now())
		if ctx.Err() != nil {
			return
		}
		wait := time.Hour
		if at, ok, err := w.led.NextNotification(ctx); err != nil {
			w.log.Error("outbox", "err", err)
			wait = time.Minute
		} else if ok {
			wait = max(time.Until(at), 10*time.Millisecond)
		}
		t := time.NewTimer(wait)
		select {
		case <-ctx.Done():
			t.Stop()
			return
		case <-w.poke:
		case <-t.C:
		}
		t.Stop()
	}
}

// deliverDue makes one attempt at every notification due at now (all
// undelivered ones for a zero now).
func (w *watcher) deliverDue(ctx context.Context, now time.Time) {
	for ctx.Err() == nil {
		due, err := w.led.DueNotifications(ctx, now, 64)
		if err != nil {
			if ctx.Err() == nil {
				w.log.Error("outbox", "err", err)
			}
			return
		}
		if len(due) == 0 {
			return
		}
		progress := false
		for _, n := range due {
			if ctx.Err() != nil {
				return
			}
			if w.deliver(ctx, n) {
				progress = true
			}
		}
		if !now.IsZero() && !progress {
			return // everything due failed and was rescheduled
		}
		if now.IsZero() {
			return // one attempt each
		}
	}
}

// deliverAll gives every undelivered notification one attempt (the end of
// a --once run); the ones that fail stay in the outbox for the next run.
func (w *watcher) deliverAll(ctx context.Context) {
	w.deliverDue(ctx, time.Time{})
	if n, err := w.led.PendingNotifications(context.WithoutCancel(ctx)); err == nil && n > 0 {
		w.log.Warn("notifications not delivered; kept for the next run", "pending", n)
	}
}

// deliver posts one notification and records the outcome.
func (w *watcher) deliver(ctx context.Context, n Notification) bool {
	bg := context.WithoutCancel(ctx)
	err := post(ctx, n)
	if err == nil {
		if err := w.led.Delivered(bg, n.ID, time.Now()); err != nil {
			w.log.Error("outbox", "err", err)
		}
		return true
	}
	if ctx.Err() != nil {
		return false // stopping: not an attempt
	}
	next := time.Now().Add(backoff(w.o.NotifyBackoff, w.o.NotifyBackoffMax, n.Attempts))
	w.log.Warn("notification not delivered", "url", n.URL, "attempt", n.Attempts+1, "retry_at", next.UTC().Format(time.RFC3339), "err", err)
	if err := w.led.Undelivered(bg, n.ID, err.Error(), next); err != nil {
		w.log.Error("outbox", "err", err)
	}
	return false
}

// backoff is the wait after the given number of earlier failed attempts:
// base, 2·base, 4·base, … up to ceiling.
func backoff(base, ceiling time.Duration, attempts int) time.Duration {
	d := base
	for i := 0; i < attempts && d < ceiling; i++ {
		d *= 2
	}
	return min(d, ceiling)
}

func post(ctx context.Context, n Notification) error {
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, n.URL, bytes.NewReader(n.Body))
	if err != nil {
		return err
	}
	req.Header.Set("Content-Type", "application/json")
	req.Header.Set("User-Agent", "kweigh-watch")
	req.Header.Set(NotificationHeader, strconv.FormatInt(n.ID, 10))
	resp, err := notifyClient.Do(req)
	if err != nil {
		return err
	}
	io.Copy(io.Discard, io.LimitReader(resp.Body, 64<<10))
	resp.Body.Close()
	if resp.StatusCode < 200 || resp.StatusCode > 299 {
		return fmt.Errorf("receiver answered %s", resp.Status)
	}
	return nil
}
