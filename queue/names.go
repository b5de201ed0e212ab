package queue

import (
	"fmt"
	"strings"
)

// DefaultPrefix is the common prefix of every stream, bucket and subject
// kweigh uses, so that several kweigh installations (or a test and a real
// one) can share one NATS server under different prefixes.
const DefaultPrefix = "KWEIGH"

// Names are the JetStream names derived from one prefix.
type Names struct {
	// Prefix is what every name starts with.
	Prefix string
}

// NewNames checks a prefix: it becomes a subject token and part of stream
// and bucket names, so it may hold only letters, digits, '-' and '_'.
func NewNames(prefix string) (Names, error) {
	if prefix == "" {
		prefix = DefaultPrefix
	}
	for _, r := range prefix {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_') {
			return Names{}, fmt.Errorf("queue prefix %q: only letters, digits, '-' and '_' are allowed (it names streams and subjects)", prefix)
		}
	}
	return Names{Prefix: prefix}, nil
}

// JobStream is the work-queue stream of jobs.
func (n Names) JobStream() string { return n.Prefix + "_JOBS" }

// ResultStream is the stream of results.
func (n Names) ResultStream() string { return n.Prefix + "_RESULTS" }

// AudioBucket is the object store bucket of audio, one object per content.
func (n Names) AudioBucket() string { return n.Prefix + "_AUDIO" }

// BatchBucket is the key-value bucket of batch manifests.
func (n Names) BatchBucket() string { return n.Prefix + "_BATCHES" }

// Consumer is the durable pull consumer all workers share.
func (n Names) Consumer() string { return "workers" }

// JobSubject is the subject of the jobs of one batch.
func (n Names) JobSubject(batch string) string { return n.Prefix + ".jobs." + batch }

// ResultSubject is the subject of the results of one batch.
func (n Names) ResultSubject(batch string) string { return n.Prefix + ".results." + batch }

// ObjectName is the audio object name for a SHA-256 digest in hex.
func ObjectName(sha256Hex string) string { return "sha256-" + strings.ToLower(sha256Hex) }

// validBatch reports whether s can be a batch id: one subject token.
func validBatch(s string) bool {
	if s == "" || len(s) > 64 {
		return false
	}
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_') {
			return false
		}
	}
	return true
}
