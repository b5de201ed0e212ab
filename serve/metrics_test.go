package serve

import (
	"bytes"
	"net/http"
	"strings"
	"testing"

	dto "github.com/prometheus/client_model/go"
	"github.com/prometheus/common/expfmt"
	"github.com/prometheus/common/model"
)

// scrape reads /metrics and parses it as Prometheus text (the parser of
// the Prometheus project, an independent reader of the format).
func scrape(t *testing.T, ts *testServer) map[string]*dto.MetricFamily {
	t.Helper()
	a := ts.get(t, "/metrics")
	if a.status != http.StatusOK || !strings.HasPrefix(a.header.Get("Content-Type"), "text/plain; version=0.0.4") {
		t.Fatalf("/metrics: %d %q", a.status, a.header.Get("Content-Type"))
	}
	p := expfmt.NewTextParser(model.LegacyValidation)
	fams, err := p.TextToMetricFamilies(bytes.NewReader(a.body))
	if err != nil {
		t.Fatalf("/metrics is not Prometheus text: %v\n%s", err, a.body)
	}
	return fams
}

// metricValue returns one sample's value: the series of name with the
// given label value (label "" for an unlabelled metric).
func metricValue(t *testing.T, ts *testServer, name, label, value string) float64 {
	t.Helper()
	fam, ok := scrape(t, ts)[name]
	if !ok {
		t.Fatalf("no metric %s", name)
	}
	for _, m := range fam.Metric {
		if label != "" {
			match := false
			for _, l := range m.Label {
				match = match || (l.GetName() == label && l.GetValue() == value)
			}
			if !match {
				continue
			}
		}
		switch {
		case m.Counter != nil:
			return m.Counter.GetValue()
		case m.Gauge != nil:
			return m.Gauge.GetValue()
		case m.Untyped != nil:
			return m.Untyped.GetValue()
		}
	}
	t.Fatalf("no series %s{%s=%q}", name, label, value)
	return 0
}

// TestMetricsFormat: every family the issue names is there with its type,
// every labelled series from the start, and the histogram is consistent.
func TestMetricsFormat(t *testing.T) {
	ts := startServer(t, Config{})
	fams := scrape(t, ts)
	for name, typ := range map[string]dto.MetricType{
		"kweigh_checks_total":        dto.MetricType_COUNTER,
		"kweigh_check_seconds":       dto.MetricType_HISTOGRAM,
		"kweigh_audio_seconds_total": dto.MetricType_COUNTER,
		"kweigh_upload_bytes_total":  dto.MetricType_COUNTER,
		"kweigh_checks_in_flight":    dto.MetricType_GAUGE,
		"kweigh_uploads_in_progress": dto.MetricType_GAUGE,
		"kweigh_rejected_total":      dto.MetricType_COUNTER,
	} {
		f, ok := fams[name]
		if !ok {
			t.Errorf("no %s", name)
			continue
		}
		if f.GetType() != typ {
			t.Errorf("%s is %v, want %v", name, f.GetType(), typ)
		}
	}
	if n := len(fams["kweigh_checks_total"].Metric); n != 4 {
		t.Errorf("%d verdict series, want 4 (pass, warn, fail, error)", n)
	}
	ts.postRaw(t, "?name=a.wav", passTone.wav())
	ts.postRaw(t, "?name=b.wav", failTone.wav())
	h := scrape(t, ts)["kweigh_check_seconds"].Metric[0].Histogram
	if h.GetSampleCount() != 2 || h.GetSampleSum() <= 0 {
		t.Errorf("histogram count %d sum %v", h.GetSampleCount(), h.GetSampleSum())
	}
	prev := uint64(0)
	for _, b := range h.Bucket {
		if b.GetCumulativeCount() < prev {
			t.Errorf("bucket le=%v count %d below the one before (%d)", b.GetUpperBound(), b.GetCumulativeCount(), prev)
		}
		prev = b.GetCumulativeCount()
	}
	if prev != 2 {
		t.Errorf("last finite bucket holds %d, want 2 (4 s files take well under 300 s)", prev)
	}
}
