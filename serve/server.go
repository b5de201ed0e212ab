package serve

import (
	"cmp"
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"os"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"github.com/kweigh/kweigh/internal/leftovers"
	"github.com/kweigh/kweigh/rules"
)

// Defaults for Config fields left zero.
const (
	DefaultMaxUpload     = 8 << 30 // 8 GiB: a 12-hour 48 kHz stereo 24-bit WAV
	DefaultHeaderTimeout = 10 * time.Second
	DefaultReadTimeout   = 30 * time.Minute // a whole upload: 8 GiB at 40 Mbit/s
	DefaultStallTimeout  = 30 * time.Second // no byte of the body for this long
	DefaultIdleTimeout   = 2 * time.Minute
	DefaultWriteTimeout  = time.Minute // writing one response
	DefaultGrace         = 30 * time.Second
	// DefaultListen is loopback only: exposing the gate is a decision.
	DefaultListen = "127.0.0.1:7350"
)

// Config sets up a Server. Catalogue is required; every other zero field
// takes its default.
type Config struct {
	// Catalogue holds the specs on offer and the default one.
	Catalogue *Catalogue
	// Judge measures and judges one upload; nil means DefaultJudge.
	Judge Judge
	// Remote, when set, judges each upload elsewhere (a work queue's
	// workers) instead of Judge: name is the client's label, path the
	// upload's private temporary file (already known to be audio). Its
	// error is answered 503 with Retry-After.
	Remote func(ctx context.Context, name, path string, spec *rules.Spec) (*rules.Result, error)
	// Tokens, when set, are the bearer tokens every /v1/ request but the
	// OpenAPI document must present; nil accepts anyone.
	Tokens *Tokens
	// MaxUpload is the largest body accepted, in bytes; 413 beyond it,
	// detected while reading.
	MaxUpload int64
	// Jobs is how many checks run at once (default: the number of CPUs);
	// Queue how many more uploads may be received or wait for a worker
	// (default 4 × Jobs). Beyond Jobs + Queue a request gets 503 with
	// Retry-After before its body is read.
	Jobs, Queue int
	// KeepDir, when set, keeps each check's JSON object and HTML report
	// there for GET /v1/checks/{id}; without it nothing is stored.
	KeepDir string
	// TempDir is where the server makes its private folder (mode 0700) for
	// uploads in progress; empty means os.TempDir() ($TMPDIR).
	TempDir string
	// HeaderTimeout bounds reading a request's headers, ReadTimeout a whole
	// request with its body, StallTimeout any pause in the body, IdleTimeout
	// a kept-alive connection between requests and WriteTimeout writing one
	// response.
	HeaderTimeout, ReadTimeout, StallTimeout, IdleTimeout, WriteTimeout time.Duration
	// Grace is how long a shutdown lets checks in flight finish before they
	// are cancelled.
	Grace time.Duration
	// Logger receives one line per request; nil means slog.Default().
	Logger *slog.Logger
	// Version is recorded in the JSON objects and on the upload page.
	Version string
	// Clock stamps reports; nil means time.Now.
	Clock func() time.Time
}

// Server is the upload gate. Make one with New, run it with Serve.
type Server struct {
	cfg     Config
	judge   Judge
	log     *slog.Logger
	metrics *metrics
	slots   chan struct{} // admitted uploads: Jobs + Queue
	workers chan struct{} // checks running: Jobs
	tmp     string        // private folder for uploads in progress
	mux     *http.ServeMux
	routes  []route

	draining atomic.Bool
	handlers sync.WaitGroup
	closed   sync.Once
}

// New checks cfg, fills in the defaults and makes the server's private
// temporary folder. Call Serve to run it, or Close to remove the folder
// when the server is used only as an http.Handler.
func New(cfg Config) (*Server, error) {
	if cfg.Catalogue == nil {
		return nil, errors.New("serve: no spec catalogue")
	}
	if cfg.Judge == nil {
		cfg.Judge = DefaultJudge
	}
	if cfg.Jobs <= 0 {
		cfg.Jobs = runtime.NumCPU()
	}
	if cfg.Queue < 0 {
		return nil, fmt.Errorf("serve: queue %d: must be 0 or more", cfg.Queue)
	}
	if cfg.Queue == 0 {
		cfg.Queue = 4 * cfg.Jobs
	}
	if cfg.MaxUpload <= 0 {
		cfg.MaxUpload = DefaultMaxUpload
	}
	setDefault(&cfg.HeaderTimeout, DefaultHeaderTimeout)
	setDefault(&cfg.ReadTimeout, DefaultReadTimeout)
	setDefault(&cfg.StallTimeout, DefaultStallTimeout)
	setDefault(&cfg.IdleTimeout, DefaultIdleTimeout)
	setDefault(&cfg.WriteTimeout, DefaultWriteTimeout)
	setDefault(&cfg.Grace, DefaultGrace)
	if cfg.Logger == nil {
		cfg.Logger = slog.Default()
	}
	if cfg.Clock == nil {
		cfg.Clock = time.Now
	}
	if cfg.KeepDir != "" {
		if err := os.MkdirAll(cfg.KeepDir, 0o750); err != nil {
			return nil, fmt.Errorf("--keep: %w", err)
		}
	}
	// The folder is named after this process; folders of servers that were
	// killed (no Close ran) are removed first (package leftovers).
	for _, gone := range leftovers.Sweep(cmp.Or(cfg.TempDir, os.TempDir()), "kweigh-serve-", "") {
		cfg.Logger.Info("removed the temporary folder of an ended server", "path", gone)
	}
	tmp, err := os.MkdirTemp(cfg.TempDir, leftovers.Pattern("kweigh-serve-", ""))
	if err != nil {
		return nil, fmt.Errorf("serve: temporary folder: %w", err)
	}
	if err := os.Chmod(tmp, 0o700); err != nil {
		os.Remove(tmp)
		return nil, fmt.Errorf("serve: temporary folder: %w", err)
	}
	s := &Server{
		cfg:     cfg,
		judge:   cfg.Judge,
		log:     cfg.Logger,
		metrics: newMetrics(),
		slots:   make(chan struct{}, cfg.Jobs+cfg.Queue),
		workers: make(chan struct{}, cfg.Jobs),
		tmp:     tmp,
	}
	s.routes = s.routeTable()
	s.mux = http.NewServeMux()
	for _, rt := range s.routes {
		s.mux.Handle(rt.method+" "+rt.pattern, s.wrap(rt))
	}
	s.mux.Handle("/", s.wrap(route{pattern: "/", handle: s.noRoute}))
	return s, nil
}

func setDefault(d *time.Duration, v time.Duration) {
	if *d <= 0 {
		*d = v
	}
}

// TempDir returns the server's private folder for uploads in progress.
func (s *Server) TempDir() string { return s.tmp }

// Handler returns the server's routes as one http.Handler.
func (s *Server) Handler() http.Handler { return s.mux }

// httpServer returns the http.Server for Serve, with the configured timeouts.
// WriteTimeout is not set on it: a long check may take minutes before
// its answer is written; each response sets its own write deadline.
func (s *Server) httpServer(base context.Context) *http.Server {
	return &http.Server{
		Handler:           s.mux,
		ReadHeaderTimeout: s.cfg.HeaderTimeout,
		ReadTimeout:       s.cfg.ReadTimeout,
		IdleTimeout:       s.cfg.IdleTimeout,
		MaxHeaderBytes:    64 << 10,
		BaseContext:       func(net.Listener) context.Context { return base },
		ErrorLog:          slog.NewLogLogger(s.log.Handler(), slog.LevelWarn),
	}
}

// Serve answers requests on ln until ctx is cancelled, then shuts down
// gracefully: it stops accepting, lets checks in flight finish for up to
// Config.Grace, cancels the rest, waits for every handler and removes
// the temporary folder. A shutdown asked for by ctx returns nil.
func (s *Server) Serve(ctx context.Context, ln net.Listener) error {
	base, cancelBase := context.WithCancel(context.Background())
	defer cancelBase()
	srv := s.httpServer(base)
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	s.log.Info("listening", "addr", ln.Addr().String(), "jobs", s.cfg.Jobs, "queue", s.cfg.Queue,
		"max_upload", s.cfg.MaxUpload, "auth", s.cfg.Tokens != nil, "keep", s.cfg.KeepDir)
	select {
	case err := <-errc:
		cancelBase()
		s.handlers.Wait()
		s.Close()
		return err
	case <-ctx.Done():
	}
	s.draining.Store(true)
	s.log.Info("shutting down", "grace", s.cfg.Grace.String())
	gctx, cancel := context.WithTimeout(context.Background(), s.cfg.Grace)
	defer cancel()
	if err := srv.Shutdown(gctx); err != nil {
		s.log.Warn("grace period over: cancelling checks in flight")
		cancelBase()
		srv.Close()
	}
	s.handlers.Wait()
	<-errc
	s.Close()
	s.log.Info("stopped")
	return nil
}

// Close removes the server's temporary folder and anything left in it.
// Serve calls it; call it yourself only when using Handler alone, after
// the last request.
func (s *Server) Close() error {
	var err error
	s.closed.Do(func() { err = os.RemoveAll(s.tmp) })
	return err
}

// newID returns a random 128-bit identifier in hex: a check's id is not
// guessable, so kept reports are not enumerable.
func newID() string {
	var b [16]byte
	if _, err := io.ReadFull(rand.Reader, b[:]); err != nil {
		panic("serve: no randomness: " + err.Error()) // crypto/rand does not fail on supported systems
	}
	return hex.EncodeToString(b[:])
}
