package reports

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// measureKeys are the keys every file object must have (issue 2, "Each file
// object has at least these keys"; notes and error from the same issue).
// bext is asserted separately: it appears only when the file has one.
var measureKeys = []string{
	"path", "format", "sample_rate_hz", "channels", "channel_layout", "bits_per_sample",
	"sample_format", "duration_s", "integrated_lufs", "loudness_range_lu", "true_peak_dbtp",
	"sample_peak_dbfs", "max_momentary_lufs", "max_short_term_lufs", "channel_true_peak_dbtp",
	"notes",
}

// checkKeys are the keys a check adds (issue 4: spec, verdict, checks,
// suggested_gain_db), and checkItemKeys those of each check.
var (
	checkKeys     = []string{"spec", "verdict", "checks", "suggested_gain_db"}
	checkItemKeys = []string{"id", "verdict", "measured", "limit", "reason"}
)

func decodeDocument(t *testing.T, data []byte) map[string]any {
	t.Helper()
	var doc map[string]any
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, data)
	}
	return doc
}

func decodeLines(t *testing.T, data []byte) []map[string]any {
	t.Helper()
	var objs []map[string]any
	for i, line := range strings.Split(strings.TrimSuffix(string(data), "\n"), "\n") {
		var obj map[string]any
		if err := json.Unmarshal([]byte(line), &obj); err != nil {
			t.Fatalf("line %d is not a JSON object: %v\n%s", i+1, err, line)
		}
		objs = append(objs, obj)
	}
	return objs
}

func files(t *testing.T, doc map[string]any) []map[string]any {
	t.Helper()
	list, ok := doc["files"].([]any)
	if !ok {
		t.Fatalf(`"files" is %T, want a list`, doc["files"])
	}
	out := make([]map[string]any, len(list))
	for i, v := range list {
		out[i] = v.(map[string]any)
	}
	return out
}

func requireKeys(t *testing.T, where string, obj map[string]any, keys []string) {
	t.Helper()
	for _, k := range keys {
		if _, ok := obj[k]; !ok {
			t.Errorf("%s: key %q missing", where, k)
		}
	}
}

func TestJSONKeys(t *testing.T) {
	measured := files(t, decodeDocument(t, renderMeasure(t, JSON, testOptions())))
	checked := files(t, decodeDocument(t, renderCheck(t, JSON, testOptions())))
	lines := decodeLines(t, renderCheck(t, JSONL, testOptions()))
	if len(measured) != len(testMeasurements()) || len(checked) != len(testResults()) || len(lines) != len(testResults()) {
		t.Fatalf("got %d measure, %d check, %d jsonl objects; want %d, %d, %d",
			len(measured), len(checked), len(lines), len(testMeasurements()), len(testResults()), len(testResults()))
	}
	for i, obj := range measured {
		requireKeys(t, "measure json "+obj["path"].(string), obj, measureKeys)
		_, hasBext := obj["bext"]
		if want := testMeasurements()[i].Bext != nil; hasBext != want {
			t.Errorf("%s: bext present = %v, want %v", obj["path"], hasBext, want)
		}
		// error: present, naming the problem, exactly when the file could not
		// be measured (issue 2).
		msg, hasError := obj["error"].(string)
		if want := testMeasurements()[i].Error; hasError != (want != "") || msg != want {
			t.Errorf("%s: error = %q (present %v), want %q", obj["path"], msg, hasError, want)
		}
	}
	for _, set := range [][]map[string]any{checked, lines} {
		for _, obj := range set {
			where := "check " + obj["path"].(string)
			requireKeys(t, where, obj, measureKeys)
			requireKeys(t, where, obj, checkKeys)
			for _, c := range obj["checks"].([]any) {
				requireKeys(t, where+" check", c.(map[string]any), checkItemKeys)
			}
		}
	}
}

// TestJSONKeyOrder: the keys come in the types' field order (doc.go).
func TestJSONKeyOrder(t *testing.T) {
	var b bytes.Buffer
	w, _ := NewCheckWriter(&b, JSONL, Options{})
	r := testResults()[0]
	r.Advice = "Deliver as it is." // omitempty: set so that its key shows
	if err := w.Write(r); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(Summary{}); err != nil {
		t.Fatal(err)
	}
	dec := json.NewDecoder(&b)
	dec.Token() // {
	var got []string
	for dec.More() {
		key, _ := dec.Token()
		got = append(got, key.(string))
		var skip json.RawMessage
		dec.Decode(&skip)
	}
	want := jsonKeysOf(reflect.TypeFor[rules.Result](), "bext", "advice")
	if !slices.Equal(got, want) {
		t.Errorf("key order\n got %v\nwant %v", got, want)
	}
}

// jsonKeysOf lists the keys encoding/json writes for a struct type, in
// field order, embedded structs in place, leaving out the omitempty keys
// other than those named in present.
func jsonKeysOf(t reflect.Type, present ...string) []string {
	var keys []string
	for f := range t.Fields() {
		name, ok := jsonFieldName(f)
		switch {
		case !ok:
		case f.Anonymous:
			keys = append(keys, jsonKeysOf(f.Type.Elem(), present...)...)
		case strings.Contains(f.Tag.Get("json"), "omitempty") && !slices.Contains(present, name):
		default:
			keys = append(keys, name)
		}
	}
	return keys
}

func TestJSONUndefinedIsNull(t *testing.T) {
	for _, obj := range files(t, decodeDocument(t, renderCheck(t, JSON, testOptions()))) {
		if !strings.HasSuffix(obj["path"].(string), "HO_sting_ident.wav") {
			continue
		}
		for _, k := range []string{"integrated_lufs", "loudness_range_lu", "max_momentary_lufs", "max_short_term_lufs", "suggested_gain_db"} {
			if v, ok := obj[k]; !ok || v != nil {
				t.Errorf("%s = %v (present %v), want null", k, v, ok)
			}
		}
		if tp := obj["channel_true_peak_dbtp"].([]any); tp[1] != nil {
			t.Errorf("channel_true_peak_dbtp[1] = %v, want null for the silent channel", tp[1])
		}
		if c := obj["checks"].([]any)[0].(map[string]any); c["measured"] != nil {
			t.Errorf("undefined measured = %v, want null", c["measured"])
		}
		if notes := obj["notes"].([]any); len(notes) != 2 {
			t.Errorf("notes = %v, want the two notes saying why", notes)
		}
		return
	}
	t.Fatal("short file missing from the output")
}

// TestJSONListsNeverNull walks every list-typed field of a zero Result (so
// fields added later are covered) and checks it encodes as [], as does a nil
// Checks list and a nil embedded Measurement.
func TestJSONListsNeverNull(t *testing.T) {
	for _, r := range []*rules.Result{
		{Measurement: &measure.Measurement{Path: "zero.wav"}},
		{}, // no measurement at all
	} {
		data, err := encodeJSON(r, "", "")
		if err != nil {
			t.Fatal(err)
		}
		var obj map[string]any
		if err := json.Unmarshal(data, &obj); err != nil {
			t.Fatal(err)
		}
		requireKeys(t, "zero result", obj, measureKeys)
		assertListsEmpty(t, reflect.TypeFor[rules.Result](), obj, "")
	}
}

func assertListsEmpty(t *testing.T, typ reflect.Type, obj map[string]any, where string) {
	t.Helper()
	for f := range typ.Fields() {
		name, ok := jsonFieldName(f)
		if !ok {
			continue
		}
		ft := f.Type
		if f.Anonymous && ft.Kind() == reflect.Pointer {
			assertListsEmpty(t, ft.Elem(), obj, where)
			continue
		}
		v, present := obj[name]
		switch ft.Kind() {
		case reflect.Slice, reflect.Map:
			if !present && strings.Contains(f.Tag.Get("json"), "omitempty") {
				continue
			}
			if v == nil {
				t.Errorf("%s%s is null, want an empty list", where, name)
			}
		case reflect.Struct:
			if sub, ok := v.(map[string]any); ok {
				assertListsEmpty(t, ft, sub, where+name+".")
			}
		}
	}
}

func TestJSONNonFinite(t *testing.T) {
	m := stereoPass()
	m.IntegratedLUFS = num(math.Inf(-1))
	m.ChannelTruePeakDBTP[1] = num(math.NaN())
	data, err := encodeJSON(m, "", "")
	if err != nil {
		t.Fatal(err)
	}
	var obj map[string]any
	json.Unmarshal(data, &obj)
	if obj["integrated_lufs"] != nil || obj["channel_true_peak_dbtp"].([]any)[1] != nil {
		t.Errorf("non-finite figures should be null: %s", data)
	}
	if *m.IntegratedLUFS != math.Inf(-1) {
		t.Error("the caller's measurement was changed")
	}

	// A non-finite number where null is impossible is an error naming the
	// file and the key, returned again at Close.
	m.Signal.DCOffset[0] = math.NaN()
	var b bytes.Buffer
	w, _ := NewMeasureWriter(&b, JSON, testOptions())
	err = w.Write(m)
	if err == nil || !strings.Contains(err.Error(), m.Path) || !strings.Contains(err.Error(), "signal.dc_offset[0]") {
		t.Errorf("Write error = %v, want one naming the file and signal.dc_offset[0]", err)
	}
	if cerr := w.Close(Summary{}); cerr == nil || cerr.Error() != err.Error() {
		t.Errorf("Close error = %v, want the first error %v", cerr, err)
	}
}

func TestJSONEmptyRun(t *testing.T) {
	var b bytes.Buffer
	w, _ := NewCheckWriter(&b, JSON, testOptions())
	if err := w.Close(Summary{}); err != nil {
		t.Fatal(err)
	}
	doc := decodeDocument(t, b.Bytes())
	if list, ok := doc["files"].([]any); !ok || len(list) != 0 {
		t.Errorf(`"files" = %#v, want []`, doc["files"])
	}
	if s := doc["summary"].(map[string]any); s["elapsed_s"] != nil || s["files"] != 0.0 {
		t.Errorf("summary = %v, want zero files and a null elapsed_s", s)
	}
	if doc["generated"] != "2025-03-13T23:30:15Z" { // testOptions' clock, 10:30:15 at UTC+11
		t.Errorf("generated = %v, want the pinned clock in UTC", doc["generated"])
	}
}

func TestJSONSummary(t *testing.T) {
	doc := decodeDocument(t, renderCheck(t, JSON, testOptions()))
	got := doc["summary"].(map[string]any)
	want := map[string]any{ // counted by hand from testResults
		"files": 7.0, "passed": 1.0, "warned": 2.0, "failed": 3.0, "errors": 1.0,
		"audio_s": 1694.352 + 1712.5 + 1688.004 + 812.004 + 0.25 + 62.75, "elapsed_s": 4.2,
	}
	for k, v := range want {
		if g, ok := got[k].(float64); !ok || math.Abs(g-v.(float64)) > 1e-9 {
			t.Errorf("summary %s = %v, want %v", k, got[k], v)
		}
	}
}

var errTest = errors.New("test")
