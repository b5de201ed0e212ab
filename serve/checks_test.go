package serve

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"math"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

var hexID = regexp.MustCompile(`^[0-9a-f]{32}$`)

// TestVerdicts uploads a passing, a warning, a failing and a damaged file,
// each as a raw body and as a multipart form, and checks the answer: the
// verdict in the header and the body, the id, the label, the integrated
// loudness, and for the damaged file the integrity check.
func TestVerdicts(t *testing.T) {
	ts := startServer(t, Config{})
	cases := []struct {
		name       string
		tone       tone
		verdict    string
		integrated float64
		tol        float64
		failing    string // a check that must fail
		source     string
	}{
		{"pass.wav", passTone, "pass", -23.0, 0.1, "", "EBU Tech 3341 case 1 (±0.1 LU)"},
		{"warn.wav", warnTone, "warn", -22.1, 0.1, "", "sine level; EBU Tech 3341 tolerance ±0.1 LU"},
		{"fail.wav", failTone, "fail", -18.0, 0.1, "integrated", "sine level; EBU Tech 3341 tolerance ±0.1 LU"},
		{"damaged.wav", damagedTone, "fail", -23.0, 0.1, "integrity", "the 2 s that are present: EBU Tech 3341 case 1"},
	}
	for _, c := range cases {
		body := c.tone.wav()
		for _, how := range []string{"raw", "multipart"} {
			t.Run(c.name+"/"+how, func(t *testing.T) {
				var a answer
				if how == "raw" {
					a = ts.postRaw(t, "?name="+c.name, body)
				} else {
					a = ts.postForm(t, c.name, body)
				}
				if a.status != 200 {
					t.Fatalf("status %d: %s", a.status, a.body)
				}
				if got := a.header.Get(HeaderVerdict); got != c.verdict {
					t.Errorf("%s: %q, want %q", HeaderVerdict, got, c.verdict)
				}
				obj := a.json(t)
				if obj["verdict"] != c.verdict || obj["path"] != c.name || obj["spec"] != "ebu-r128" {
					t.Errorf("verdict %v path %v spec %v, want %s %s ebu-r128", obj["verdict"], obj["path"], obj["spec"], c.verdict, c.name)
				}
				id, _ := obj["id"].(string)
				if !hexID.MatchString(id) || a.header.Get(HeaderCheckID) != id {
					t.Errorf("id %q, header %q", id, a.header.Get(HeaderCheckID))
				}
				if got, ok := obj["integrated_lufs"].(float64); !ok || math.Abs(got-c.integrated) > c.tol {
					t.Errorf("integrated %v, want %.1f ±%.1f (%s)", obj["integrated_lufs"], c.integrated, c.tol, c.source)
				}
				if c.failing != "" && checkVerdict(obj, c.failing) != "fail" {
					t.Errorf("check %s is %q, want fail: %s", c.failing, checkVerdict(obj, c.failing), a.body)
				}
				if c.tone.cut > 0 {
					if d, _ := obj["damaged"].(string); d == "" {
						t.Errorf("damaged file without a damaged note: %s", a.body)
					}
					if got := obj["duration_s"].(float64); math.Abs(got-2) > 0.001 {
						t.Errorf("damaged file measured %v s, want the 2 s present", got)
					}
				}
				if files := ts.tempFiles(t); len(files) != 0 {
					t.Errorf("temporary files left: %v", files)
				}
			})
		}
	}
	// One log line per request, with what an operator needs.
	var judged int
	for _, l := range ts.logs.requests(t) {
		if l["path"] != "/v1/checks" {
			continue
		}
		judged++
		for _, k := range []string{"id", "remote", "size", "spec", "verdict", "duration_s", "status"} {
			if _, ok := l[k]; !ok {
				t.Errorf("log line lacks %q: %v", k, l)
			}
		}
		if !strings.HasPrefix(l["remote"].(string), "127.0.0.1:") {
			t.Errorf("remote %v", l["remote"])
		}
	}
	if judged != 2*len(cases) {
		t.Errorf("%d log lines for %d uploads", judged, 2*len(cases))
	}
}

// checkVerdict returns the verdict of the check with the given id in a
// check object.
func checkVerdict(obj map[string]any, id string) string {
	checks, _ := obj["checks"].([]any)
	for _, c := range checks {
		if m, ok := c.(map[string]any); ok && m["id"] == id {
			v, _ := m["verdict"].(string)
			return v
		}
	}
	return ""
}

// TestSameObjectAsCheckJSON holds the answer against the file object of
// `kweigh check --format json` (made by the same library calls the command
// makes, on the same file from disk): apart from id and path (the label)
// they are equal key by key.
func TestSameObjectAsCheckJSON(t *testing.T) {
	ts := startServer(t, Config{})
	path := failTone.file(t, t.TempDir(), "fail.wav")
	body := failTone.wav()
	obj := ts.postRaw(t, "?name=fail.wav", body).json(t)

	spec, _ := rules.Lookup("ebu-r128")
	m := measure.File(context.Background(), path, measure.Options{})
	r := rules.Evaluate(spec, m)
	var doc bytes.Buffer
	w, err := reports.NewCheckWriter(&doc, reports.JSON, reports.Options{Spec: "ebu-r128"})
	if err != nil {
		t.Fatal(err)
	}
	w.Write(&r)
	w.Close(reports.Summary{})
	var parsed struct {
		Files []map[string]any `json:"files"`
	}
	if err := json.Unmarshal(doc.Bytes(), &parsed); err != nil || len(parsed.Files) != 1 {
		t.Fatalf("check document: %v\n%s", err, doc.Bytes())
	}
	want := parsed.Files[0]
	delete(obj, "id")
	if obj["path"] != "fail.wav" || want["path"] != path {
		t.Errorf("paths %v / %v", obj["path"], want["path"])
	}
	delete(obj, "path")
	delete(want, "path")
	got, _ := json.Marshal(obj)
	exp, _ := json.Marshal(want)
	if !bytes.Equal(got, exp) {
		t.Errorf("answer differs from the check --format json object:\n got %s\nwant %s", got, exp)
	}
}

// TestRefusals covers the answers without a verdict: not audio, an
// unsupported coding, an empty body, unknown specs (in the query, before
// the body is read, and in a form field).
func TestRefusals(t *testing.T) {
	ts := startServer(t, Config{})
	// µ-law WAV: a well-formed header with format tag 7.
	mulaw := passTone.wav()
	mulaw[20] = 7
	cases := []struct {
		name   string
		send   func() answer
		status int
		says   string
	}{
		{"not audio", func() answer { return ts.postRaw(t, "?name=running-order.txt", notAudio) }, 422, "running-order.txt: not a recognised audio file"},
		{"not audio, multipart", func() answer { return ts.postForm(t, "running-order.txt", notAudio) }, 422, "running-order.txt: not a recognised audio file"},
		{"unsupported coding", func() answer { return ts.postRaw(t, "?name=old.wav", mulaw) }, 422, "unsupported"},
		{"empty body", func() answer { return ts.postRaw(t, "", nil) }, 422, "empty"},
		{"empty file part", func() answer { return ts.postForm(t, "nothing.wav", nil) }, 422, "empty"},
		{"unknown spec in the query", func() answer { return ts.postRaw(t, "?spec=kestrel-house", passTone.wav()) }, 400, `unknown spec "kestrel-house"`},
		{"unknown spec in the form", func() answer { return ts.postForm(t, "a.wav", passTone.wav(), "spec", "kestrel-house") }, 400, "ebu-r128-qc"},
		{"form without a file part", func() answer { return ts.postFormFields(t, "spec", "podcast") }, 400, `no "file" part`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a := c.send()
			if a.status != c.status {
				t.Fatalf("status %d, want %d: %s", a.status, c.status, a.body)
			}
			msg, _ := a.json(t)["error"].(string)
			if !strings.Contains(msg, c.says) {
				t.Errorf("error %q does not say %q", msg, c.says)
			}
			if a.header.Get(HeaderVerdict) != "" {
				t.Errorf("a refusal carries a verdict header")
			}
		})
	}
	if files := ts.tempFiles(t); len(files) != 0 {
		t.Errorf("temporary files left: %v", files)
	}
}

// postFormFields sends a multipart form with fields only.
func (ts *testServer) postFormFields(t *testing.T, fields ...string) answer {
	t.Helper()
	return ts.postMultipart(t, fields)
}

// TestSpecChoice judges one file against a spec from --specs DIR (an
// invented outlet's house spec) chosen in the query, and against a
// built-in chosen in a form field.
func TestSpecChoice(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "saltmarsh.toml"), `name = "saltmarsh-fm"
title = "Saltmarsh FM programme delivery (a fictional station)"
extends = "ebu-r128"

[loudness]
max_true_peak_dbtp = -24.0
`)
	extra, err := LoadSpecDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	def, _ := rules.Lookup("ebu-r128")
	cat, err := NewCatalogue(def, extra...)
	if err != nil {
		t.Fatal(err)
	}
	ts := startServer(t, Config{Catalogue: cat})
	// The pass tone's true peak is about -23 dBTP: above saltmarsh-fm's
	// -24 dBTP ceiling.
	obj := ts.postRaw(t, "?spec=saltmarsh-fm&name=ep1.wav", passTone.wav()).json(t)
	if obj["spec"] != "saltmarsh-fm" || obj["verdict"] != "fail" || checkVerdict(obj, "true_peak") != "fail" {
		t.Errorf("saltmarsh-fm: spec %v verdict %v true_peak %q", obj["spec"], obj["verdict"], checkVerdict(obj, "true_peak"))
	}
	// podcast: -16 LUFS ±1 LU, so -23 LUFS fails; the form field wins
	// over the query.
	obj = ts.postForm(t, "ep1.wav", passTone.wav(), "spec", "podcast").json(t)
	if obj["spec"] != "podcast" || obj["verdict"] != "fail" {
		t.Errorf("podcast: spec %v verdict %v", obj["spec"], obj["verdict"])
	}
}

// TestUnmeasurableAudio: a float WAV holding a NaN sample opens as audio
// but cannot be measured: it is answered 200 with verdict error and the
// reason, not refused as not audio.
func TestUnmeasurableAudio(t *testing.T) {
	ts := startServer(t, Config{})
	const frames = 48000
	var b bytes.Buffer
	le := func(v any) { binary.Write(&b, binary.LittleEndian, v) }
	b.WriteString("RIFF")
	le(uint32(36 + 8*frames))
	b.WriteString("WAVEfmt ")
	le([]uint32{16})
	le([]uint16{3, 2}) // IEEE float, stereo
	le([]uint32{48000, 48000 * 8})
	le([]uint16{8, 32})
	b.WriteString("data")
	le(uint32(8 * frames))
	for i := range frames {
		v := float32(0.1 * math.Sin(2*math.Pi*997*float64(i)/48000))
		if i == 1000 {
			v = float32(math.NaN())
		}
		le([]float32{v, v})
	}
	a := ts.postRaw(t, "?name=nan.wav", b.Bytes())
	if a.status != 200 || a.header.Get(HeaderVerdict) != "error" {
		t.Fatalf("%d %q: %s", a.status, a.header.Get(HeaderVerdict), a.body)
	}
	if msg, _ := a.json(t)["error"].(string); !strings.Contains(msg, "NaN") || !strings.Contains(msg, "nan.wav") {
		t.Errorf("error %q does not name the file and the NaN", msg)
	}
	if got := metricValue(t, ts, "kweigh_checks_total", "verdict", "error"); got != 1 {
		t.Errorf("checks_total{verdict=error} = %v", got)
	}
}
