package watch

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"golang.org/x/sys/unix"

	_ "modernc.org/sqlite" // the pure-Go SQLite driver, registered as "sqlite"
)

// State is where a file version is in its way through the watcher.
type State string

// The states of a ledger row, in the order a file goes through them. Gone is
// the end of a file that vanished (or was replaced) before it was placed.
const (
	StateSeen     State = "seen"     // found in an inbox
	StateSettling State = "settling" // seen unchanged at least once, waiting for the settle time
	StateJudging  State = "judging"  // complete; fingerprinted; being judged
	StateJudged   State = "judged"   // verdict and report pair written; being placed
	StatePlaced   State = "placed"   // moved (or left, without --passed/--failed): done
	StateGone     State = "gone"     // vanished or replaced before it was placed
)

// VerdictSkipped is the ledger verdict of a file that is not audio and is
// not named as audio: it is left where it is, with no report.
const VerdictSkipped = "skipped"

// Entry is one ledger row: one version of one file.
type Entry struct {
	ID          int64
	Inbox       string // the inbox folder as named
	Rel         string // the file's path below the inbox, slash-separated
	Size        int64
	ModTime     time.Time
	Fingerprint string // SHA-256 of the content, hex; empty until judging starts
	State       State
	Verdict     string // pass, warn, fail, error, skipped; empty until judged
	Error       string // what went wrong with this file, if anything
	Stem        string // report names below the reports folder, without .json/.html
	Dest        string // where the file goes (or went); empty when it stays
	Reports     string // the folder holding the report pair (Stem + .json/.html)
	Record      []byte // the check record (JSON)
	SeenAt      time.Time
	JudgedAt    time.Time // zero until judged
	PlacedAt    time.Time // zero until placed
	UpdatedAt   time.Time
}

// Path is the file's path in its inbox.
func (e Entry) Path() string { return filepath.Join(e.Inbox, filepath.FromSlash(e.Rel)) }

// Ledger is the watcher's SQLite database. Only one process writes it (a
// lock file enforces that); the database/sql pool has one connection, so
// every statement and transaction of this process is serialised too.
type Ledger struct {
	db   *sql.DB
	lock *os.File
	path string
}

// LedgerFile is the database's name inside the state folder.
const LedgerFile = "ledger.sqlite"

const schema = `
CREATE TABLE IF NOT EXISTS files (
	id          INTEGER PRIMARY KEY,
	inbox       TEXT NOT NULL,
	rel         TEXT NOT NULL,
	size        INTEGER NOT NULL,
	mtime_ns    INTEGER NOT NULL,
	fingerprint TEXT NOT NULL DEFAULT '',
	state       TEXT NOT NULL,
	verdict     TEXT NOT NULL DEFAULT '',
	error       TEXT NOT NULL DEFAULT '',
	stem        TEXT,
	dest        TEXT NOT NULL DEFAULT '',
	reports     TEXT NOT NULL DEFAULT '',
	record      BLOB,
	seen_at     INTEGER NOT NULL,
	judged_at   INTEGER NOT NULL DEFAULT 0,
	placed_at   INTEGER NOT NULL DEFAULT 0,
	updated_at  INTEGER NOT NULL
);
CREATE INDEX IF NOT EXISTS files_path ON files(inbox, rel);
CREATE INDEX IF NOT EXISTS files_state ON files(state);
CREATE UNIQUE INDEX IF NOT EXISTS files_stem ON files(stem);
CREATE TABLE IF NOT EXISTS outbox (
	id           INTEGER PRIMARY KEY,
	file_id      INTEGER NOT NULL REFERENCES files(id),
	url          TEXT NOT NULL,
	body         BLOB NOT NULL,
	attempts     INTEGER NOT NULL DEFAULT 0,
	next_at      INTEGER NOT NULL,
	delivered_at INTEGER NOT NULL DEFAULT 0,
	last_error   TEXT NOT NULL DEFAULT ''
);
CREATE INDEX IF NOT EXISTS outbox_due ON outbox(delivered_at, next_at);
`

// OpenLedger opens (creating when needed) the ledger in the state folder
// dir for writing. It fails when another process already holds it.
func OpenLedger(dir string) (*Ledger, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("state folder: %w", err)
	}
	lockPath := filepath.Join(dir, "lock")
	lock, err := os.OpenFile(lockPath, os.O_CREATE|os.O_RDWR, 0o644)
	if err != nil {
		return nil, fmt.Errorf("state folder: %w", err)
	}
	if err := unix.Flock(int(lock.Fd()), unix.LOCK_EX|unix.LOCK_NB); err != nil {
		lock.Close()
		if errors.Is(err, unix.EWOULDBLOCK) {
			return nil, fmt.Errorf("%s: another kweigh watch is using this state folder", dir)
		}
		return nil, fmt.Errorf("%s: %w", lockPath, err)
	}
	l, err := openDB(filepath.Join(dir, LedgerFile), false)
	if err != nil {
		lock.Close()
		return nil, err
	}
	l.lock = lock
	return l, nil
}

// OpenLedgerReader opens an existing ledger for reading only (kweigh
// history); a running watcher may keep writing it meanwhile (WAL readers do
// not block the writer).
func OpenLedgerReader(dir string) (*Ledger, error) {
	path := filepath.Join(dir, LedgerFile)
	if _, err := os.Stat(path); err != nil {
		return nil, fmt.Errorf("no ledger in %s: %w", dir, err)
	}
	return openDB(path, true)
}

func openDB(path string, readOnly bool) (*Ledger, error) {
	// WAL: a commit is one append to the log, and readers (kweigh history)
	// do not block the writer. synchronous(FULL) syncs the log at every
	// commit, so a committed transition survives a power cut, not only a
	// killed process.
	dsn := "file:" + path + "?_pragma=busy_timeout(10000)&_pragma=journal_mode(WAL)&_pragma=synchronous(FULL)&_pragma=foreign_keys(1)"
	if readOnly {
		dsn = "file:" + path + "?mode=ro&_pragma=busy_timeout(10000)"
	}
	db, err := sql.Open("sqlite", dsn)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	db.SetMaxOpenConns(1)
	l := &Ledger{db: db, path: path}
	if !readOnly {
		if _, err := db.Exec(schema); err != nil {
			db.Close()
			return nil, fmt.Errorf("%s: creating the ledger: %w", path, err)
		}
	} else if err := db.Ping(); err != nil {
		db.Close()
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return l, nil
}

// Close closes the database and releases the lock.
func (l *Ledger) Close() error {
	err := l.db.Close()
	if l.lock != nil {
		l.lock.Close()
	}
	if err != nil {
		return fmt.Errorf("%s: %w", l.path, err)
	}
	return nil
}

func (l *Ledger) wrap(what string, err error) error {
	if err == nil {
		return nil
	}
	return fmt.Errorf("ledger %s: %s: %w", l.path, what, err)
}

func nanos(t time.Time) int64 {
	if t.IsZero() {
		return 0
	}
	return t.UnixNano()
}

func fromNanos(n int64) time.Time {
	if n == 0 {
		return time.Time{}
	}
	return time.Unix(0, n).UTC()
}

const entryColumns = `id, inbox, rel, size, mtime_ns, fingerprint, state, verdict, error,
	coalesce(stem, ''), dest, reports, coalesce(record, ''), seen_at, judged_at, placed_at, updated_at`

type scanner interface{ Scan(...any) error }

func scanEntry(row scanner) (Entry, error) {
	var e Entry
	var mtime, seen, judged, placed, updated int64
	var state string
	err := row.Scan(&e.ID, &e.Inbox, &e.Rel, &e.Size, &mtime, &e.Fingerprint, &state, &e.Verdict,
		&e.Error, &e.Stem, &e.Dest, &e.Reports, &e.Record, &seen, &judged, &placed, &updated)
	if err != nil {
		return e, err
	}
	e.State = State(state)
	e.ModTime = fromNanos(mtime)
	e.SeenAt, e.JudgedAt, e.PlacedAt, e.UpdatedAt = fromNanos(seen), fromNanos(judged), fromNanos(placed), fromNanos(updated)
	return e, nil
}

func (l *Ledger) query(ctx context.Context, what, where string, args ...any) ([]Entry, error) {
	rows, err := l.db.QueryContext(ctx, "SELECT "+entryColumns+" FROM files "+where, args...)
	if err != nil {
		return nil, l.wrap(what, err)
	}
	defer rows.Close()
	var out []Entry
	for rows.Next() {
		e, err := scanEntry(rows)
		if err != nil {
			return nil, l.wrap(what, err)
		}
		out = append(out, e)
	}
	return out, l.wrap(what, rows.Err())
}

// Unfinished returns the rows a previous run left before placed, oldest
// first.
func (l *Ledger) Unfinished(ctx context.Context) ([]Entry, error) {
	return l.query(ctx, "reading unfinished files",
		"WHERE state IN ('seen', 'settling', 'judging', 'judged') ORDER BY id")
}

// Version returns the newest row for this version of the file (same inbox
// path, size and modification time), if any.
func (l *Ledger) Version(ctx context.Context, inbox, rel string, size int64, mtime time.Time) (Entry, bool, error) {
	es, err := l.query(ctx, "looking up "+rel,
		"WHERE inbox = ? AND rel = ? AND size = ? AND mtime_ns = ? ORDER BY id DESC LIMIT 1",
		inbox, rel, size, nanos(mtime))
	if err != nil || len(es) == 0 {
		return Entry{}, false, err
	}
	return es[0], true, nil
}

// Since returns every row updated at or after t (all rows for a zero t),
// oldest first.
func (l *Ledger) Since(ctx context.Context, t time.Time) ([]Entry, error) {
	return l.query(ctx, "reading the history", "WHERE updated_at >= ? ORDER BY id", nanos(t))
}

// Get returns one row.
func (l *Ledger) Get(ctx context.Context, id int64) (Entry, error) {
	es, err := l.query(ctx, "reading a file", "WHERE id = ?", id)
	if err == nil && len(es) == 0 {
		err = l.wrap("reading a file", fmt.Errorf("no row %d", id))
	}
	if err != nil {
		return Entry{}, err
	}
	return es[0], nil
}

// Seen records a newly found file.
func (l *Ledger) Seen(ctx context.Context, inbox, rel string, size int64, mtime, now time.Time) (int64, error) {
	res, err := l.db.ExecContext(ctx,
		`INSERT INTO files (inbox, rel, size, mtime_ns, state, seen_at, updated_at) VALUES (?, ?, ?, ?, 'seen', ?, ?)`,
		inbox, rel, size, nanos(mtime), nanos(now), nanos(now))
	if err != nil {
		return 0, l.wrap("recording "+rel, err)
	}
	id, err := res.LastInsertId()
	return id, l.wrap("recording "+rel, err)
}

// Observation is a file not yet judged as a scan found it.
type Observation struct {
	ID         int64 // 0 for a file new to the ledger; set by Observe
	Inbox, Rel string
	Size       int64
	ModTime    time.Time
	State      State // seen or settling
}

// Observe records a scan's findings in one transaction: new files get a
// row in state seen, known ones their new size, time and state.
func (l *Ledger) Observe(ctx context.Context, obs []*Observation, now time.Time) error {
	tx, err := l.db.BeginTx(ctx, nil)
	if err != nil {
		return l.wrap("recording a scan", err)
	}
	defer tx.Rollback()
	for _, o := range obs {
		if o.ID != 0 {
			if _, err := tx.ExecContext(ctx,
				`UPDATE files SET size = ?, mtime_ns = ?, state = ?, fingerprint = '', updated_at = ? WHERE id = ? AND state IN ('seen', 'settling', 'judging')`,
				o.Size, nanos(o.ModTime), string(o.State), nanos(now), o.ID); err != nil {
				return l.wrap("recording a scan", err)
			}
			continue
		}
		res, err := tx.ExecContext(ctx,
			`INSERT INTO files (inbox, rel, size, mtime_ns, state, seen_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?)`,
			o.Inbox, o.Rel, o.Size, nanos(o.ModTime), string(o.State), nanos(now), nanos(now))
		if err != nil {
			return l.wrap("recording "+o.Rel, err)
		}
		if o.ID, err = res.LastInsertId(); err != nil {
			return l.wrap("recording "+o.Rel, err)
		}
	}
	if err := tx.Commit(); err != nil {
		for _, o := range obs {
			o.ID = 0
		}
		return l.wrap("recording a scan", err)
	}
	return nil
}

// Observed records a file not yet judged as it is now: growing (back to
// seen, with its new size and time) or unchanged (settling).
func (l *Ledger) Observed(ctx context.Context, id int64, size int64, mtime time.Time, state State, now time.Time) error {
	_, err := l.db.ExecContext(ctx,
		`UPDATE files SET size = ?, mtime_ns = ?, state = ?, fingerprint = '', updated_at = ? WHERE id = ? AND state IN ('seen', 'settling', 'judging')`,
		size, nanos(mtime), string(state), nanos(now), id)
	return l.wrap("updating a file", err)
}

// Judging records that a settled file, with this fingerprint, is being
// judged, and gives it its report names (and placement name) in the same
// commit: the first of name(1), name(2), … that no other row holds and for
// which free(n) is true. A row judged again after an interruption keeps
// the names it had.
func (l *Ledger) Judging(ctx context.Context, id int64, fingerprint string, name func(n int) string, free func(n int) bool, now time.Time) (string, error) {
	tx, err := l.db.BeginTx(ctx, nil)
	if err != nil {
		return "", l.wrap("recording judging", err)
	}
	defer tx.Rollback()
	stem, err := claimStem(ctx, tx, id, name, free)
	if err != nil {
		return "", l.wrap("claiming report names", err)
	}
	if _, err := tx.ExecContext(ctx,
		`UPDATE files SET state = 'judging', fingerprint = ?, stem = ?, error = '', updated_at = ? WHERE id = ?`,
		fingerprint, stem, nanos(now), id); err != nil {
		return "", l.wrap("recording judging", err)
	}
	return stem, l.wrap("recording judging", tx.Commit())
}

func claimStem(ctx context.Context, tx *sql.Tx, id int64, name func(n int) string, free func(n int) bool) (string, error) {
	var have sql.NullString
	if err := tx.QueryRowContext(ctx, `SELECT stem FROM files WHERE id = ?`, id).Scan(&have); err != nil {
		return "", err
	}
	if have.Valid && have.String != "" {
		return have.String, nil
	}
	for n := 1; n < 100000; n++ {
		stem := name(n)
		var taken int
		if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM files WHERE stem = ?`, stem).Scan(&taken); err != nil {
			return "", err
		}
		if taken == 0 && free(n) {
			return stem, nil
		}
	}
	return "", errors.New("no free name")
}

// Judged records the verdict, the record, the report folder and where the
// file goes.
func (l *Ledger) Judged(ctx context.Context, id int64, verdict string, record []byte, reports, dest, problem string, now time.Time) error {
	_, err := l.db.ExecContext(ctx,
		`UPDATE files SET state = 'judged', verdict = ?, record = ?, reports = ?, dest = ?, error = ?, judged_at = ?, updated_at = ? WHERE id = ?`,
		verdict, record, reports, dest, problem, nanos(now), nanos(now), id)
	return l.wrap("recording the verdict", err)
}

// Redirect changes where a judged file goes (a clash found at move time).
func (l *Ledger) Redirect(ctx context.Context, id int64, dest string, now time.Time) error {
	_, err := l.db.ExecContext(ctx, `UPDATE files SET dest = ?, updated_at = ? WHERE id = ?`, dest, nanos(now), id)
	return l.wrap("recording the destination", err)
}

// Placed records that the file is where it belongs, and in the same
// transaction queues its notification when notifyURL is set, so a placed
// file never misses its notification.
func (l *Ledger) Placed(ctx context.Context, id int64, dest string, now time.Time, notifyURL string, body []byte) error {
	tx, err := l.db.BeginTx(ctx, nil)
	if err != nil {
		return l.wrap("recording the placement", err)
	}
	defer tx.Rollback()
	if _, err := tx.ExecContext(ctx,
		`UPDATE files SET state = 'placed', dest = ?, placed_at = ?, updated_at = ? WHERE id = ?`,
		dest, nanos(now), nanos(now), id); err != nil {
		return l.wrap("recording the placement", err)
	}
	if notifyURL != "" {
		if _, err := tx.ExecContext(ctx,
			`INSERT INTO outbox (file_id, url, body, next_at) VALUES (?, ?, ?, ?)`,
			id, notifyURL, body, nanos(now)); err != nil {
			return l.wrap("queueing the notification", err)
		}
	}
	return l.wrap("recording the placement", tx.Commit())
}

// Skipped records a file that is not audio: left where it is, done.
func (l *Ledger) Skipped(ctx context.Context, id int64, reason string, now time.Time) error {
	_, err := l.db.ExecContext(ctx,
		`UPDATE files SET state = 'placed', verdict = 'skipped', error = ?, placed_at = ?, updated_at = ? WHERE id = ?`,
		reason, nanos(now), nanos(now), id)
	return l.wrap("recording a skipped file", err)
}

// Gone records that the file vanished (or was replaced) before it was
// placed.
func (l *Ledger) Gone(ctx context.Context, id int64, reason string, now time.Time) error {
	_, err := l.db.ExecContext(ctx,
		`UPDATE files SET state = 'gone', error = ?, updated_at = ? WHERE id = ?`, reason, nanos(now), id)
	return l.wrap("recording a vanished file", err)
}

// Problem records an error with a file (e.g. a failed move) without
// changing its state; the step is tried again later.
func (l *Ledger) Problem(ctx context.Context, id int64, problem string, now time.Time) error {
	_, err := l.db.ExecContext(ctx, `UPDATE files SET error = ?, updated_at = ? WHERE id = ?`, problem, nanos(now), id)
	return l.wrap("recording a problem", err)
}
