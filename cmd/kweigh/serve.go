package main

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"net"
	"runtime"
	"strings"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/queue"
	"github.com/kweigh/kweigh/rules"
	"github.com/kweigh/kweigh/serve"
)

func serveCommand() *cli.Command {
	return &cli.Command{
		Name:      "serve",
		Usage:     "run the upload gate: an HTTP service that judges files as they are delivered",
		ArgsUsage: " ",
		Description: "Answers POST /v1/checks (the audio file as the body, or multipart/form-data with a file part)\n" +
			"with the verdict and the same JSON object 'check --format json' gives, and serves an upload page\n" +
			"at /, the specs on offer, /healthz, /readyz and /metrics. The API is described at /v1/openapi.json.\n\n" +
			"It listens on loopback only unless told otherwise; any other address needs --token-file (bearer\n" +
			"tokens, one per line) or an explicit --no-auth. Uploads are streamed to a private temporary folder\n" +
			"and removed once judged; with --keep DIR each check's JSON and HTML report are kept for retrieval.\n" +
			"SIGINT or SIGTERM stops accepting, lets checks in flight finish for up to --grace, then exits 0;\n" +
			"a second signal ends it at once.\n\n" +
			"A pass is not a broadcaster's or regulator's acceptance; local regulation and the receiving\n" +
			"party's own QC decide.\n\n" +
			"EXIT STATUS:\n   0  stopped by SIGINT or SIGTERM\n   2  the server could not start (bad option, address in use, listening exposed without --token-file)\n",
		Flags: append([]cli.Flag{
			&cli.StringFlag{Name: "listen", Value: serve.DefaultListen, Usage: "`ADDR`ess to listen on (host:port); anything but loopback needs --token-file or --no-auth"},
			&cli.StringFlag{Name: "token-file", Usage: "`FILE` of bearer tokens, one per line; every /v1/ request must present one"},
			&cli.BoolFlag{Name: "no-auth", Usage: "accept requests from anyone on a non-loopback address (no token)"},
			&cli.StringFlag{Name: "spec", Aliases: []string{"s"}, Value: "ebu-r128", Usage: "default spec `NAME|FILE` for uploads that name none"},
			&cli.StringFlag{Name: "specs", Usage: "`DIR` of extra TOML specs offered by name (file name or the spec's name)"},
			&cli.StringFlag{Name: "max-upload", Value: "8GiB", Usage: "largest upload `SIZE` (bytes, or with a unit: 500MB, 50MiB, 8GiB); 413 beyond it"},
			&cli.IntFlag{Name: "jobs", Aliases: []string{"j"}, Value: runtime.NumCPU(), Usage: "checks run at once"},
			&cli.IntFlag{Name: "queue", Value: 0, Usage: "uploads received or waiting beyond --jobs before 503 (default 4 × jobs)"},
			&cli.StringFlag{Name: "keep", Usage: "keep each check's JSON and HTML report in `DIR` for GET /v1/checks/{id}"},
			&cli.DurationFlag{Name: "header-timeout", Value: serve.DefaultHeaderTimeout, Usage: "time to read a request's headers"},
			&cli.DurationFlag{Name: "read-timeout", Value: serve.DefaultReadTimeout, Usage: "time to read a whole request, body included"},
			&cli.DurationFlag{Name: "stall-timeout", Value: serve.DefaultStallTimeout, Usage: "longest pause allowed inside an upload"},
			&cli.DurationFlag{Name: "idle-timeout", Value: serve.DefaultIdleTimeout, Usage: "how long a kept-alive connection may wait for its next request"},
			&cli.DurationFlag{Name: "grace", Value: serve.DefaultGrace, Usage: "on SIGINT/SIGTERM, how long checks in flight may take to finish"},
			&cli.StringFlag{Name: "log-format", Value: "text", Usage: "request log on stderr: text or json"},
		}, queueFlags(false)...),
		Action: func(ctx context.Context, cmd *cli.Command) error {
			if cmd.Args().Len() > 0 {
				return usagef("serve takes no arguments (got %q)", cmd.Args().First())
			}
			return runServe(ctx, cmd, cmd.Root().ErrWriter)
		},
	}
}

// runServe checks the options, listens and serves until a signal.
func runServe(ctx context.Context, cmd *cli.Command, stderr io.Writer) error {
	var logger *slog.Logger
	switch f := cmd.String("log-format"); f {
	case "text":
		logger = slog.New(slog.NewTextHandler(stderr, nil))
	case "json":
		logger = slog.New(slog.NewJSONHandler(stderr, nil))
	default:
		return usagef("--log-format %q: use text or json", f)
	}
	maxUpload, err := serve.ParseSize(cmd.String("max-upload"))
	if err != nil {
		return usagef("--max-upload: %v", err)
	}
	jobs, waiting := cmd.Int("jobs"), cmd.Int("queue")
	if jobs < 1 {
		return usagef("--jobs must be at least 1")
	}
	if waiting < 0 {
		return usagef("--queue must be 0 or more")
	}
	var tokens *serve.Tokens
	if p := cmd.String("token-file"); p != "" {
		if tokens, err = serve.LoadTokens(p); err != nil {
			return usageError{err}
		}
	}
	addr := cmd.String("listen")
	if err := serve.CheckExposure(addr, tokens, cmd.Bool("no-auth")); err != nil {
		return usageError{err}
	}
	def, err := loadSpec(cmd.String("spec"))
	if err != nil {
		return err
	}
	def = serve.NamedSpec(def)
	var extra []*rules.Spec
	if dir := cmd.String("specs"); dir != "" {
		if extra, err = serve.LoadSpecDir(dir); err != nil {
			return usageError{err}
		}
	}
	cat, err := serve.NewCatalogue(def, extra...)
	if err != nil {
		return usageError{err}
	}
	// With --nats the gate receives, refuses what is not audio and answers;
	// the queue's workers measure and judge.
	var remote func(context.Context, string, string, *rules.Spec) (*rules.Result, error)
	dial, viaQueue, err := readDial(cmd, "serve")
	if err != nil {
		return err
	}
	if viaQueue {
		q, err := queue.Connect(ctx, dial)
		if err != nil {
			return usageError{err}
		}
		defer q.Close()
		remote = func(ctx context.Context, name, path string, spec *rules.Spec) (*rules.Result, error) {
			rec, err := queueJudge(q, spec, measure.Options{})(ctx, engine.Target{Path: path, Root: path, Explicit: true}, engine.Options{})
			if err != nil {
				return nil, err
			}
			if m := rec.Measurement; m != nil {
				// The client's label, never the server's temporary path.
				m.Path, m.Error = name, strings.ReplaceAll(m.Error, path, name)
				m.Damaged = strings.ReplaceAll(m.Damaged, path, name)
			}
			return rec.Result, nil
		}
	}
	srv, err := serve.New(serve.Config{
		Catalogue: cat, Tokens: tokens, MaxUpload: maxUpload, Jobs: jobs, Queue: waiting,
		KeepDir:       cmd.String("keep"),
		HeaderTimeout: cmd.Duration("header-timeout"), ReadTimeout: cmd.Duration("read-timeout"),
		StallTimeout: cmd.Duration("stall-timeout"), IdleTimeout: cmd.Duration("idle-timeout"),
		Grace: positive(cmd.Duration("grace")), Logger: logger, Version: versionString(),
		Remote: remote,
	})
	if err != nil {
		return usageError{err}
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		srv.Close()
		return usageError{fmt.Errorf("--listen: %w", err)}
	}
	// SIGINT and SIGTERM cancel ctx (main): the gate then drains and
	// returns nil, so a requested stop exits 0.
	return srv.Serve(ctx, ln)
}

// positive keeps a zero grace meaning "no wait" rather than the default.
func positive(d time.Duration) time.Duration {
	if d <= 0 {
		return time.Nanosecond
	}
	return d
}
