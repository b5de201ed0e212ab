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
	"syscall"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/reports"

	// The formats kweigh reads, registered with package decode.
	_ "github.com/kweigh/kweigh/decode/formats"
)

// Exit statuses, documented in every command's help.
const (
	exitOK      = 0 // everything measured (and, for check, passed or warned)
	exitFailed  = 1 // check: at least one file failed its spec
	exitTrouble = 2 // a file could not be measured, or the command line was wrong
	// exitInterrupted is SIGINT's status (128 + 2); SIGTERM gives 143.
	exitInterrupted = 130
	exitsHelpFmt    = `EXIT STATUS:
   0  %s
   1  %s
   2  a file could not be measured, no audio file was found, or the command line is wrong
 130  interrupted by SIGINT (Ctrl-C), 143 by SIGTERM: files not done are left out, the outputs
      say so, and --output, --report and --plots files are not replaced
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

// interruptedError is a run stopped by a signal (or a cancelled context)
// before every file was done. Its exit status is the shell's convention for
// a process ended by a signal, 128 + the signal's number: 130 for SIGINT,
// 143 for SIGTERM.
type interruptedError struct {
	sig        os.Signal // nil: cancelled otherwise (counted as SIGINT)
	unfinished int
}

func (e interruptedError) Error() string {
	by := "interrupted"
	if e.sig != nil {
		by = "interrupted by " + signalName(e.sig)
	}
	return fmt.Sprintf("%s: %d file(s) not done; the outputs say so, and --output, --report and --plots files were not replaced", by, e.unfinished)
}

// status is 128 + the signal number.
func (e interruptedError) status() int {
	if s, ok := e.sig.(syscall.Signal); ok {
		return 128 + int(s)
	}
	return exitInterrupted
}

func signalName(s os.Signal) string {
	switch s {
	case os.Interrupt:
		return "SIGINT"
	case syscall.SIGTERM:
		return "SIGTERM"
	}
	return s.String()
}

// interruption is the error for a run whose ctx was cancelled; the signal
// comes from the context's cause when main set one.
func interruption(ctx context.Context, unfinished int) error {
	e := interruptedError{unfinished: unfinished}
	var cause interruptedError
	if errors.As(context.Cause(ctx), &cause) {
		e.sig = cause.sig
	}
	return e
}

// exitCode maps a command's error to the process exit status.
func exitCode(err error) int {
	var failed failedError
	var stopped interruptedError
	switch {
	case err == nil:
		return exitOK
	case errors.As(err, &stopped):
		return stopped.status()
	case errors.As(err, &failed):
		return exitFailed
	default:
		return exitTrouble
	}
}

func main() {
	ctx, cancel := context.WithCancelCause(context.Background())
	signals := make(chan os.Signal, 2)
	signal.Notify(signals, os.Interrupt, syscall.SIGTERM)
	go onSignals(signals, cancel, os.Exit, os.Stderr)
	os.Exit(run(ctx, os.Args, os.Stdout, os.Stderr))
}

// onSignals handles SIGINT and SIGTERM: the first cancels the run (it
// stops between two blocks of audio and writes what it has, marked as
// interrupted); a second one ends the process at once.
func onSignals(signals <-chan os.Signal, cancel context.CancelCauseFunc, exit func(int), stderr io.Writer) {
	first := <-signals
	fmt.Fprintf(stderr, "kweigh: %s: stopping (send it again to quit at once)\n", signalName(first))
	cancel(interruptedError{sig: first})
	second := <-signals
	exit(interruptedError{sig: second}.status())
}

// run executes the command line and returns the exit status; tests call it
// directly.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	root := newRootCommand(stdout, stderr)
	err := root.Run(ctx, args)
	if topic, ok := unknownHelpTopic(err); ok {
		err = unknownCommand(root, topic)
	}
	var quiet interface{ alreadyReported() }
	if err != nil && !errors.As(err, &quiet) {
		var failed failedError
		var trouble troubleError
		switch {
		case errors.As(err, &failed), errors.As(err, &trouble):
			// The output already says which files and why.
		default:
			fmt.Fprintf(stderr, "kweigh: %s\n", reports.Printable(err.Error()))
		}
	}
	return exitCode(err)
}

func newRootCommand(stdout, stderr io.Writer) *cli.Command {
	return &cli.Command{
		Name:    "kweigh",
		Usage:   "check audio deliveries against loudness specs (ITU-R BS.1770)",
		Version: versionString(),
		Description: "kweigh measures integrated loudness, loudness range, momentary and short-term maxima and\n" +
			"true peak per ITU-R BS.1770 and EBU Tech 3341/3342, and judges files against delivery specs.\n\n" +
			"A pass is not a broadcaster's or regulator's acceptance: local regulation and the receiving\n" +
			"party's own QC decide. Full-scale test signals and gain increases can damage hearing and\n" +
			"loudspeakers: keep monitoring levels down when auditioning.",
		Writer:    stdout,
		ErrWriter: stderr,
		// `kweigh help [COMMAND]`, and `kweigh completion bash|zsh|fish`.
		EnableShellCompletion:           true,
		ConfigureShellCompletionCommand: configureCompletion,
		Action:                          rootAction(stderr),
		// Errors are reported and mapped to exit statuses by run.
		ExitErrHandler: func(context.Context, *cli.Command, error) {},
		OnUsageError: func(_ context.Context, _ *cli.Command, err error, _ bool) error {
			return usageError{err}
		},
		Commands: []*cli.Command{
			measureCommand(),
			checkCommand(),
			workerCommand(),
			resultsCommand(),
			fixCommand(),
			specsCommand(),
			watchCommand(),
			historyCommand(),
			serveCommand(),
			versionCommand(),
		},
	}
}
