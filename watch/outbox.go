package watch

import (
	"context"
	"time"
)

// Notification is one queued webhook delivery.
type Notification struct {
	ID       int64
	FileID   int64
	URL      string
	Body     []byte
	Attempts int
	NextAt   time.Time
}

// DueNotifications returns undelivered notifications due at or before now
// (all undelivered ones for a zero now), oldest first.
func (l *Ledger) DueNotifications(ctx context.Context, now time.Time, limit int) ([]Notification, error) {
	due := int64(1<<63 - 1)
	if !now.IsZero() {
		due = nanos(now)
	}
	rows, err := l.db.QueryContext(ctx,
		`SELECT id, file_id, url, body, attempts, next_at FROM outbox WHERE delivered_at = 0 AND next_at <= ? ORDER BY next_at, id LIMIT ?`,
		due, limit)
	if err != nil {
		return nil, l.wrap("reading the outbox", err)
	}
	defer rows.Close()
	var out []Notification
	for rows.Next() {
		var n Notification
		var next int64
		if err := rows.Scan(&n.ID, &n.FileID, &n.URL, &n.Body, &n.Attempts, &next); err != nil {
			return nil, l.wrap("reading the outbox", err)
		}
		n.NextAt = fromNanos(next)
		out = append(out, n)
	}
	return out, l.wrap("reading the outbox", rows.Err())
}

// NextNotification returns when the earliest undelivered notification is
// due; ok is false when the outbox is empty.
func (l *Ledger) NextNotification(ctx context.Context) (at time.Time, ok bool, err error) {
	var next *int64
	err = l.db.QueryRowContext(ctx, `SELECT min(next_at) FROM outbox WHERE delivered_at = 0`).Scan(&next)
	if err != nil {
		return time.Time{}, false, l.wrap("reading the outbox", err)
	}
	if next == nil {
		return time.Time{}, false, nil
	}
	return fromNanos(*next), true, nil
}

// PendingNotifications counts undelivered notifications.
func (l *Ledger) PendingNotifications(ctx context.Context) (int, error) {
	var n int
	err := l.db.QueryRowContext(ctx, `SELECT count(*) FROM outbox WHERE delivered_at = 0`).Scan(&n)
	return n, l.wrap("reading the outbox", err)
}

// Delivered records a notification the receiver accepted.
func (l *Ledger) Delivered(ctx context.Context, id int64, now time.Time) error {
	_, err := l.db.ExecContext(ctx,
		`UPDATE outbox SET delivered_at = ?, attempts = attempts + 1, last_error = '' WHERE id = ?`, nanos(now), id)
	return l.wrap("recording a delivery", err)
}

// Undelivered records a failed attempt and when to try again.
func (l *Ledger) Undelivered(ctx context.Context, id int64, problem string, next time.Time) error {
	_, err := l.db.ExecContext(ctx,
		`UPDATE outbox SET attempts = attempts + 1, next_at = ?, last_error = ? WHERE id = ?`, nanos(next), problem, id)
	return l.wrap("recording a failed delivery", err)
}
