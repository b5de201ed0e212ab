package serve

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"sync"
	"time"

	"github.com/kweigh/kweigh/rules"
)

// Rejection reasons, the values of kweigh_rejected_total's reason label.
const (
	reasonTooLarge     = "too_large"
	reasonNotAudio     = "not_audio"
	reasonBusy         = "busy"
	reasonUnauthorised = "unauthorised"
	reasonBadRequest   = "bad_request"
	reasonIncomplete   = "incomplete" // client gone or too slow before the upload was whole
)

var (
	verdictLabels = []string{string(rules.Pass), string(rules.Warn), string(rules.Fail), string(rules.Error)}
	reasonLabels  = []string{reasonTooLarge, reasonNotAudio, reasonBusy, reasonUnauthorised, reasonBadRequest, reasonIncomplete}
	// checkBuckets are the upper bounds of kweigh_check_seconds, from a
	// short clip (tens of milliseconds) to a long programme in a lossy
	// format (minutes).
	checkBuckets = []float64{0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30, 60, 120, 300}
)

// metrics are the server's counters, written in the Prometheus text
// exposition format (version 0.0.4) by writeTo. Every labelled series is
// present from the start, at zero, so a rate over it is defined at once.
type metrics struct {
	mu           sync.Mutex
	checks       map[string]uint64 // by verdict
	rejected     map[string]uint64 // by reason
	buckets      []uint64          // cumulative counts are made when written
	checkCount   uint64
	checkSum     float64
	audioSeconds float64
	uploadBytes  uint64
	inFlight     int64 // checks being measured
	uploads      int64 // uploads admitted and not yet answered
}

func newMetrics() *metrics {
	m := &metrics{checks: map[string]uint64{}, rejected: map[string]uint64{}, buckets: make([]uint64, len(checkBuckets))}
	for _, v := range verdictLabels {
		m.checks[v] = 0
	}
	for _, r := range reasonLabels {
		m.rejected[r] = 0
	}
	return m
}

// checked records one finished check.
func (m *metrics) checked(verdict rules.Verdict, took time.Duration, audioSeconds float64) {
	m.mu.Lock()
	defer m.mu.Unlock()
	m.checks[string(verdict)]++
	s := took.Seconds()
	for i, le := range checkBuckets {
		if s <= le {
			m.buckets[i]++
			break
		}
	}
	m.checkCount++
	m.checkSum += s
	if !math.IsNaN(audioSeconds) && !math.IsInf(audioSeconds, 0) && audioSeconds > 0 {
		m.audioSeconds += audioSeconds
	}
}

func (m *metrics) reject(reason string) {
	m.mu.Lock()
	m.rejected[reason]++
	m.mu.Unlock()
}

func (m *metrics) received(n int64) {
	m.mu.Lock()
	m.uploadBytes += uint64(n)
	m.mu.Unlock()
}

func (m *metrics) addInFlight(d int64) {
	m.mu.Lock()
	m.inFlight += d
	m.mu.Unlock()
}

func (m *metrics) addUploads(d int64) {
	m.mu.Lock()
	m.uploads += d
	m.mu.Unlock()
}

// meanCheckSeconds is the mean time of a check so far (0 before the first).
func (m *metrics) meanCheckSeconds() float64 {
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.checkCount == 0 {
		return 0
	}
	return m.checkSum / float64(m.checkCount)
}

// writeTo writes every metric in the text exposition format.
func (m *metrics) writeTo(w io.Writer) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	p := &promWriter{w: w}
	p.family("kweigh_checks_total", "counter", "Uploads judged, by verdict.")
	for _, v := range verdictLabels {
		p.sample("kweigh_checks_total", `verdict="`+v+`"`, float64(m.checks[v]))
	}
	p.family("kweigh_check_seconds", "histogram", "Time to decode, measure and judge one upload (receiving and queueing not included).")
	var cum uint64
	for i, le := range checkBuckets {
		cum += m.buckets[i]
		p.sample("kweigh_check_seconds_bucket", `le="`+formatFloat(le)+`"`, float64(cum))
	}
	p.sample("kweigh_check_seconds_bucket", `le="+Inf"`, float64(m.checkCount))
	p.sample("kweigh_check_seconds_sum", "", m.checkSum)
	p.sample("kweigh_check_seconds_count", "", float64(m.checkCount))
	p.family("kweigh_audio_seconds_total", "counter", "Seconds of audio in the uploads judged.")
	p.sample("kweigh_audio_seconds_total", "", m.audioSeconds)
	p.family("kweigh_upload_bytes_total", "counter", "Bytes of uploads received in full.")
	p.sample("kweigh_upload_bytes_total", "", float64(m.uploadBytes))
	p.family("kweigh_checks_in_flight", "gauge", "Checks being measured now.")
	p.sample("kweigh_checks_in_flight", "", float64(m.inFlight))
	p.family("kweigh_uploads_in_progress", "gauge", "Uploads admitted and not yet answered: being received, waiting for a worker or being measured.")
	p.sample("kweigh_uploads_in_progress", "", float64(m.uploads))
	p.family("kweigh_rejected_total", "counter", "Requests to judge an upload refused without a verdict, by reason.")
	for _, r := range reasonLabels {
		p.sample("kweigh_rejected_total", `reason="`+r+`"`, float64(m.rejected[r]))
	}
	return p.err
}

// promWriter writes exposition lines and keeps the first error.
type promWriter struct {
	w   io.Writer
	err error
}

func (p *promWriter) family(name, kind, help string) {
	p.printf("# HELP %s %s\n# TYPE %s %s\n", name, help, name, kind)
}

func (p *promWriter) sample(name, labels string, v float64) {
	if labels != "" {
		p.printf("%s{%s} %s\n", name, labels, formatFloat(v))
		return
	}
	p.printf("%s %s\n", name, formatFloat(v))
}

func (p *promWriter) printf(format string, a ...any) {
	if p.err == nil {
		_, p.err = fmt.Fprintf(p.w, format, a...)
	}
}

// formatFloat writes a sample value the way the exposition format reads it
// (Go's shortest float form; integers without an exponent).
func formatFloat(v float64) string {
	if v == math.Trunc(v) && math.Abs(v) < 1e15 {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}
