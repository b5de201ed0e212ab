package queue

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"sync"
	"time"

	"github.com/nats-io/nats.go"
	"github.com/nats-io/nats.go/jetstream"
)

// Dial says how to reach the NATS server. Only what nats.go offers is used:
// kweigh never listens itself.
type Dial struct {
	// URL is one server URL or a comma-separated list (nats://, tls://).
	URL string
	// Creds is a credentials file (a user JWT and its NKey seed).
	Creds string
	// CA is a PEM file of the authorities that sign the server's
	// certificate; it also makes TLS required.
	CA string
	// Cert and Key are a client certificate and its key, for servers that
	// verify clients.
	Cert, Key string
	// Name is the connection name the server shows in its monitoring.
	Name string
	// Prefix starts every stream, bucket and subject name (DefaultPrefix
	// when empty).
	Prefix string
	// AudioMaxAge is how long an uploaded file stays in the audio bucket
	// (DefaultAudioMaxAge when zero). Without a limit the bucket of a
	// long-running queue only grows; the limit applies to the bucket, so
	// the last process to connect sets it for all.
	AudioMaxAge time.Duration
}

// DefaultAudioMaxAge keeps uploaded audio as long as results are kept.
const DefaultAudioMaxAge = resultMaxAge

// Queue is a connection to the queue with its streams and buckets in place.
type Queue struct {
	nc    *nats.Conn
	js    jetstream.JetStream
	names Names
	// audioMaxAge is the audio bucket's object lifetime; an upload that
	// finds its object older than half of it sends it again, so a job
	// always has at least half the lifetime to be worked on.
	audioMaxAge time.Duration

	mu    sync.Mutex
	audio jetstream.ObjectStore // cached handle; nil until first used
}

// audioStore returns the audio bucket's handle, looked up once (each look-up
// is a round trip to the server).
func (q *Queue) audioStore(ctx context.Context) (jetstream.ObjectStore, error) {
	q.mu.Lock()
	defer q.mu.Unlock()
	if q.audio != nil {
		return q.audio, nil
	}
	s, err := q.js.ObjectStore(ctx, q.names.AudioBucket())
	if err != nil {
		return nil, err
	}
	q.audio = s
	return s, nil
}

// Connect connects and makes sure the streams and buckets exist (creating
// them with file storage when missing). It waits at most until ctx ends
// for the server; later disconnections are retried for ever, so a server
// restart is ridden out.
func Connect(ctx context.Context, d Dial) (*Queue, error) {
	names, err := NewNames(d.Prefix)
	if err != nil {
		return nil, err
	}
	if d.URL == "" {
		return nil, errors.New("no NATS server URL given")
	}
	opts := []nats.Option{
		nats.Name(d.Name),
		nats.MaxReconnects(-1),
		nats.ReconnectWait(250 * time.Millisecond),
		nats.RetryOnFailedConnect(false),
	}
	if d.Creds != "" {
		opts = append(opts, nats.UserCredentials(d.Creds))
	}
	if d.CA != "" {
		opts = append(opts, nats.RootCAs(d.CA))
	}
	if d.Cert != "" || d.Key != "" {
		if d.Cert == "" || d.Key == "" {
			return nil, errors.New("a client certificate needs both its certificate and its key file")
		}
		opts = append(opts, nats.ClientCert(d.Cert, d.Key))
	}
	nc, err := nats.Connect(d.URL, opts...)
	if err != nil {
		return nil, fmt.Errorf("NATS server %s: %w", d.URL, err)
	}
	js, err := jetstream.New(nc)
	if err != nil {
		nc.Close()
		return nil, fmt.Errorf("NATS server %s: %w", d.URL, err)
	}
	if d.AudioMaxAge < 0 {
		nc.Close()
		return nil, fmt.Errorf("audio lifetime %v is negative", d.AudioMaxAge)
	}
	q := &Queue{nc: nc, js: js, names: names, audioMaxAge: cmp.Or(d.AudioMaxAge, DefaultAudioMaxAge)}
	if err := q.ensure(ctx); err != nil {
		nc.Close()
		return nil, fmt.Errorf("NATS server %s: %w", d.URL, err)
	}
	return q, nil
}

// Names returns the queue's names.
func (q *Queue) Names() Names { return q.names }

// Close closes the connection after flushing what is buffered.
func (q *Queue) Close() {
	q.nc.Drain()
	q.nc.Close()
}

// resultMaxAge is how long results stay for `kweigh results` to collect.
const resultMaxAge = 7 * 24 * time.Hour

// dedupWindow is how long JetStream remembers message ids; a job or result
// published again within it with the same id is stored once.
const dedupWindow = 30 * time.Minute

// ensure creates or keeps the streams and buckets. Updating an existing
// stream to the same configuration is a no-op on the server.
func (q *Queue) ensure(ctx context.Context) error {
	n := q.names
	if _, err := q.js.CreateOrUpdateStream(ctx, jetstream.StreamConfig{
		Name:        n.JobStream(),
		Description: "kweigh jobs: one message per file to judge, removed when a worker acknowledges it",
		Subjects:    []string{n.Prefix + ".jobs.>"},
		Retention:   jetstream.WorkQueuePolicy,
		Storage:     jetstream.FileStorage,
		Duplicates:  dedupWindow,
	}); err != nil {
		return fmt.Errorf("job stream %s: %w", n.JobStream(), err)
	}
	if _, err := q.js.CreateOrUpdateStream(ctx, jetstream.StreamConfig{
		Name:        n.ResultStream(),
		Description: "kweigh results: one message per judged job",
		Subjects:    []string{n.Prefix + ".results.>"},
		Retention:   jetstream.LimitsPolicy,
		Storage:     jetstream.FileStorage,
		MaxAge:      resultMaxAge,
		Duplicates:  dedupWindow,
	}); err != nil {
		return fmt.Errorf("result stream %s: %w", n.ResultStream(), err)
	}
	if _, err := q.js.CreateOrUpdateObjectStore(ctx, jetstream.ObjectStoreConfig{
		Bucket:      n.AudioBucket(),
		Description: "kweigh audio, one object per content, named by its SHA-256",
		Storage:     jetstream.FileStorage,
		TTL:         q.audioMaxAge,
	}); err != nil {
		return fmt.Errorf("audio bucket %s: %w", n.AudioBucket(), err)
	}
	if _, err := q.js.CreateOrUpdateKeyValue(ctx, jetstream.KeyValueConfig{
		Bucket:      n.BatchBucket(),
		Description: "kweigh batch manifests, for collecting results later",
		Storage:     jetstream.FileStorage,
		TTL:         resultMaxAge,
	}); err != nil {
		return fmt.Errorf("batch bucket %s: %w", n.BatchBucket(), err)
	}
	return nil
}

// consumer creates or updates the workers' shared pull consumer.
func (q *Queue) consumer(ctx context.Context, ackWait time.Duration) (jetstream.Consumer, error) {
	return q.js.CreateOrUpdateConsumer(ctx, q.names.JobStream(), jetstream.ConsumerConfig{
		Durable:     q.names.Consumer(),
		Description: "kweigh workers",
		AckPolicy:   jetstream.AckExplicitPolicy,
		AckWait:     ackWait,
		// Unlimited here: the worker itself ends a job that was delivered
		// too often with an error result, so nothing is dropped silently.
		MaxDeliver:    -1,
		FilterSubject: q.names.Prefix + ".jobs.>",
	})
}

// retry calls f until it succeeds, ctx ends or the error is not one that
// a reconnection can cure.
func retry(ctx context.Context, f func(context.Context) error) error {
	wait := 100 * time.Millisecond
	for {
		cctx, cancel := context.WithTimeout(ctx, 5*time.Second)
		err := f(cctx)
		cancel()
		if err == nil {
			return nil
		}
		if ctx.Err() != nil {
			return fmt.Errorf("%w (last error: %v)", ctx.Err(), err)
		}
		if !transient(err) {
			return err
		}
		select {
		case <-ctx.Done():
			return fmt.Errorf("%w (last error: %v)", ctx.Err(), err)
		case <-time.After(wait):
		}
		wait = min(2*wait, 2*time.Second)
	}
}

// transient reports whether err is a server or connection outage.
func transient(err error) bool {
	return errors.Is(err, nats.ErrNoResponders) || errors.Is(err, jetstream.ErrNoStreamResponse) ||
		errors.Is(err, context.DeadlineExceeded) || errors.Is(err, nats.ErrTimeout) ||
		errors.Is(err, nats.ErrConnectionReconnecting) || errors.Is(err, nats.ErrDisconnected) ||
		errors.Is(err, jetstream.ErrJetStreamNotEnabled) || errors.Is(err, nats.ErrJetStreamNotEnabled) ||
		errors.Is(err, jetstream.ErrStreamNotFound) || errors.Is(err, jetstream.ErrNoHeartbeat)
}
