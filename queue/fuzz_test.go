package queue

import (
	"encoding/json"
	"math"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// FuzzDecodeJob: a job message from the network never panics the worker;
// one that is accepted has what a worker needs.
func FuzzDecodeJob(f *testing.F) {
	good, _ := json.Marshal(Job{Batch: "b1", Index: 3, Name: "tide/ep1.wav", Object: "sha256-00", Size: 9, Spec: SpecRef{Builtin: "ebu-r128"}})
	f.Add(good)
	f.Add([]byte(`{"batch":"a.b","index":0,"name":"x","object":"o"}`))
	f.Add([]byte(`{"batch":"b","index":-1}`))
	f.Add([]byte(`[]`))
	f.Fuzz(func(t *testing.T, data []byte) {
		j, err := decodeJob(data)
		if err != nil {
			return
		}
		if !validBatch(j.Batch) || j.Index < 0 || j.Name == "" || j.Object == "" {
			t.Fatalf("accepted an incomplete job %+v", j)
		}
		// Resolving the spec of any accepted job fails or succeeds, never panics.
		j.Spec.Resolve()
	})
}

// FuzzDecodeOutcome: a result message from the network never panics the
// collector; an accepted one carries a measurement (or is a skip).
func FuzzDecodeOutcome(f *testing.F) {
	lufs := -23.0
	r := rules.Result{Measurement: &measure.Measurement{Path: "ep.wav", IntegratedLUFS: &lufs, Notes: []string{}}, Spec: "ebu-r128", Verdict: rules.Pass,
		Checks: []rules.Check{{ID: "integrated", Verdict: rules.Pass, Measured: -23.0, Unit: "LUFS"}}}
	o, _ := newOutcome("b1", 0, &r, false, SpecRef{Builtin: "ebu-r128"})
	good, _ := encodeOutcome(o)
	f.Add(good)
	f.Add([]byte(`{"batch":"b","index":0,"skipped":true}`))
	f.Add([]byte(`{"batch":"b","index":0,"result":{},"series":"AAAA"}`))
	f.Add([]byte(`{"result":null}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		o, _, err := decodeOutcome(data)
		if err != nil {
			return
		}
		if !o.Skipped && (o.Result == nil || o.Result.Measurement == nil) {
			t.Fatalf("accepted an outcome without a measurement: %+v", o)
		}
	})
}

// TestOutcomeRoundTrip: what a worker sends is what the collector gets,
// with non-finite figures as null (as kweigh's JSON report shows them).
func TestOutcomeRoundTrip(t *testing.T) {
	lufs, lra := -23.04, 0.0
	peak := math.Inf(-1) // digital silence's sample peak
	r := rules.Result{Measurement: &measure.Measurement{Path: "ep.wav", IntegratedLUFS: &lufs, LoudnessRangeLU: &lra, SamplePeakDBFS: &peak,
		Notes: []string{"n"}, Error: ""}, Spec: "ebu-r128", Verdict: rules.Warn,
		Checks: []rules.Check{{ID: "integrated", Verdict: rules.Pass, Measured: -23.04, Unit: "LUFS"}, {ID: "codec", Measured: "pcm"}}}
	o, err := newOutcome("b1", 4, &r, false, SpecRef{Builtin: "ebu-r128"})
	if err != nil {
		t.Fatal(err)
	}
	data, err := encodeOutcome(o)
	if err != nil {
		t.Fatal(err)
	}
	back, _, err := decodeOutcome(data)
	if err != nil {
		t.Fatal(err)
	}
	m := back.Result.Measurement
	if back.Index != 4 || *m.IntegratedLUFS != lufs || m.LoudnessRangeLU == nil || *m.LoudnessRangeLU != 0 || m.SamplePeakDBFS != nil {
		t.Errorf("round trip: index %d, integrated %v, range %v (a zero must stay a zero), sample peak %v (want null)", back.Index, m.IntegratedLUFS, m.LoudnessRangeLU, m.SamplePeakDBFS)
	}
	if back.Result.Checks[0].Measured != -23.04 || back.Result.Checks[1].Measured != "pcm" || back.Result.Verdict != rules.Warn {
		t.Errorf("checks %+v", back.Result.Checks)
	}
}
