package rules

import (
	"encoding/json"
	"slices"
	"testing"
)

// TestResultJSONKeys pins the JSON contract of issue 4: the measurement's
// keys plus spec, verdict, checks (id, verdict, measured, limit, reason) and
// suggested_gain_db; lists are [] not null.
func TestResultJSONKeys(t *testing.T) {
	r := Evaluate(mustLookup(t, "ebu-r128"), cleanStereo(-18.7, -0.5))
	data, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var obj map[string]any
	if err := json.Unmarshal(data, &obj); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"path", "integrated_lufs", "true_peak_dbtp", "signal", "spec", "verdict", "checks", "suggested_gain_db", "limiter_reduction_db", "advice"} {
		if _, ok := obj[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if obj["spec"] != "ebu-r128" || obj["verdict"] != "fail" || obj["suggested_gain_db"] != -4.3 {
		t.Errorf("spec %v verdict %v gain %v", obj["spec"], obj["verdict"], obj["suggested_gain_db"])
	}
	check := obj["checks"].([]any)[1].(map[string]any)
	var keys []string
	for k := range check {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	if want := []string{"id", "limit", "measured", "reason", "unit", "verdict"}; !slices.Equal(keys, want) {
		t.Errorf("check keys %v, want %v", keys, want)
	}
	// An unmeasurable file still has a checks list.
	data, _ = json.Marshal(Evaluate(mustLookup(t, "ebu-r128"), (&measureError{"truncated header"}).measurement()))
	if err := json.Unmarshal(data, &obj); err != nil {
		t.Fatal(err)
	}
	if c, ok := obj["checks"].([]any); !ok || len(c) != 1 || obj["verdict"] != "error" || obj["suggested_gain_db"] != nil {
		t.Errorf("error result JSON: %s", data)
	}
}
