package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"time"

	"github.com/urfave/cli/v3"

	"github.com/kweigh/kweigh/queue"
)

// Test support only (the queue's tests of the real binary use them):
// crashOnEnv names a file (by base name) on which a worker process exits at
// once, as if it had crashed, when it is about to judge it (a poison file);
// stallOnEnv names one on which it stalls for a minute, or until it is told
// to stop, before judging it (a job to kill a worker in the middle of).
const (
	crashOnEnv = "KWEIGH_TEST_CRASH_ON"
	stallOnEnv = "KWEIGH_TEST_STALL_ON"
)

func workerCommand() *cli.Command {
	flags := append(queueFlags(true),
		&cli.IntFlag{Name: "jobs", Aliases: []string{"j"}, Value: runtime.NumCPU(), Usage: "jobs judged at once"},
		&cli.DurationFlag{Name: "ack-wait", Value: 30 * time.Second, Usage: "how long the queue waits for a worker's heartbeat before it hands a job to another (set on the shared consumer: give all workers the same)"},
		&cli.IntFlag{Name: "max-deliveries", Value: 5, Usage: "a job delivered more often than this (its workers kept dying) ends as an error result instead of being judged again"},
		&cli.DurationFlag{Name: "drain", Value: 10 * time.Second, Usage: "on SIGINT or SIGTERM, how long running jobs may finish before they are handed back to the queue"},
		&cli.StringFlag{Name: "name", Usage: "the worker's `NAME` in logs and results (default host:pid)"},
	)
	return &cli.Command{
		Name:  "worker",
		Usage: "judge files from a NATS JetStream queue, for 'kweigh check --nats' on other machines",
		Description: "Pulls jobs from the queue, fetches each file's audio from the queue's object store, judges\n" +
			"it against the spec that came with the job, publishes the result and then acknowledges the\n" +
			"job. While a file is judged the worker tells the queue it is still at it, so long files are\n" +
			"not handed to another worker; a worker that dies loses its jobs to others after --ack-wait.\n" +
			"SIGINT or SIGTERM stops fetching, lets running jobs finish for --drain and hands back the\n" +
			"rest. One line per job goes to stderr.\n\n" +
			"EXIT STATUS:\n   0  stopped by SIGINT or SIGTERM\n   2  the queue could not be reached, or the command line is wrong\n",
		Flags: flags,
		Action: func(ctx context.Context, cmd *cli.Command) error {
			dial, _, err := readDial(cmd, "worker")
			if err != nil {
				return err
			}
			if cmd.Args().Len() > 0 {
				return usagef("worker takes no file arguments: the files come from the queue")
			}
			cfg := queue.Config{
				Jobs: cmd.Int("jobs"), AckWait: cmd.Duration("ack-wait"), MaxDeliveries: cmd.Int("max-deliveries"),
				Drain: cmd.Duration("drain"), Name: cmd.String("name"), Log: cmd.Root().ErrWriter,
			}
			if cfg.Jobs < 1 || cfg.MaxDeliveries < 1 || cfg.AckWait < 100*time.Millisecond || cfg.Drain <= 0 {
				return usagef("--jobs and --max-deliveries must be at least 1, --ack-wait at least 100ms and --drain positive")
			}
			if crash, stall := os.Getenv(crashOnEnv), os.Getenv(stallOnEnv); crash != "" || stall != "" {
				cfg.BeforeJudge = func(ctx context.Context, j queue.Job) {
					switch filepath.Base(j.Name) {
					case crash:
						fmt.Fprintf(cmd.Root().ErrWriter, "kweigh worker: %s=%s: crashing on purpose (test support)\n", crashOnEnv, crash)
						os.Exit(3)
					case stall:
						fmt.Fprintf(cmd.Root().ErrWriter, "kweigh worker: %s=%s: stalling on purpose (test support)\n", stallOnEnv, stall)
						select {
						case <-ctx.Done():
						case <-time.After(time.Minute):
						}
					}
				}
			}
			q, err := queue.Connect(ctx, dial)
			if err != nil {
				return err
			}
			defer q.Close()
			fmt.Fprintf(cmd.Root().ErrWriter, "kweigh worker: waiting for jobs on %s (queue %s)\n", dial.URL, q.Names().JobStream())
			return q.Work(ctx, cfg)
		},
	}
}
