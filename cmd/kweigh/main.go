// Command kweigh measures delivered audio files per ITU-R BS.1770 and judges
// them against loudness delivery specs (EBU R 128, ATSC A/85, podcast
// practice, a receiving party's house spec …), in batches, before anyone
// submits them.
//
// This package only wires the command line to the library packages: one file
// per subcommand, each with an options struct and a run function that
// writes to the given streams; exitCode is the one place that maps errors to
// exit statuses.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"

	"github.com/urfave/cli/v3"

	// The formats kweigh reads, registered with package decode.
	_ "github.com/kweigh/kweigh/decode/formats"
)

// version is set at build time with -ldflags "-X main.version=…".
var version = "dev"

// Exit statuses, documented in every command's help.
const (
	exitOK       = 0 // everything measured (and, for check, passed or warned)
	exitFailed   = 1 // check: at least one file failed its spec
	exitTrouble  = 2 // a file could not be measured, or the command line was wrong
	exitsHelpFmt = `EXIT STATUS:
   0  %s
   1  %s
   2  a file could not be measured, no audio file was found, or the command line is wrong
`
)

// failedError reports that at least one file failed its spec (exit 1).
type failedError struct{ n int }

func (e failedError) Error() string { return fmt.Sprintf("%d file(s) failed the spec", e.n) }

// troubleError reports files that could not be measured (exit 2); the
// details are already in the output, so the message is a summary.
type troubleError struct{ n int }

func (e troubleError) Error() string { return fmt.Sprintf("%d file(s) could not be measured", e.n) }

// usageError is a mistake on the command line (exit 2).
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

func usagef(format string, a ...any) error { return usageError{fmt.Errorf(format, a...)} }

// exitCode maps a command's error to the process exit status.
func exitCode(err error) int {
	var failed failedError
	switch {
	case err == nil:
		return exitOK
	case errors.As(err, &failed):
		return exitFailed
	default:
		return exitTrouble
	}
}

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	os.Exit(run(ctx, os.Args, os.Stdout, os.Stderr))
}

// run executes the command line and returns the exit status; tests call it
// directly.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	root := newRootCommand(stdout, stderr)
	err := root.Run(ctx, args)
	var quiet interface{ alreadyReported() }
	if err != nil && !errors.As(err, &quiet) {
		var failed failedError
		var trouble troubleError
		switch {
		case errors.As(err, &failed), errors.As(err, &trouble):
			// The output already says which files and why.
		default:
			fmt.Fprintf(stderr, "kweigh: %v\n", err)
		}
	}
	return exitCode(err)
}

func newRootCommand(stdout, stderr io.Writer) *cli.Command {
	return &cli.Command{
		Name:    "kweigh",
		Usage:   "check audio deliveries against loudness specs (ITU-R BS.1770)",
		Version: version,
		Description: "kweigh measures integrated loudness, loudness range, momentary and short-term maxima and\n" +
			"true peak per ITU-R BS.1770 and EBU Tech 3341/3342, and judges files against delivery specs.\n\n" +
			"A pass is not a broadcaster's or regulator's acceptance: local regulation and the receiving\n" +
			"party's own QC decide. Full-scale test signals and gain increases can damage hearing and\n" +
			"loudspeakers: keep monitoring levels down when auditioning.",
		Writer:          stdout,
		ErrWriter:       stderr,
		HideHelpCommand: true,
		// Errors are reported and mapped to exit statuses by run.
		ExitErrHandler: func(context.Context, *cli.Command, error) {},
		OnUsageError: func(_ context.Context, _ *cli.Command, err error, _ bool) error {
			return usageError{err}
		},
		Commands: []*cli.Command{
			measureCommand(),
			checkCommand(),
			specsCommand(),
			watchCommand(),
			historyCommand(),
		},
	}
}
