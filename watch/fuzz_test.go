package watch

import (
	"encoding/json"
	"testing"
	"time"
)

// FuzzPlacedRecord: whatever record the judge hands over, the line that
// goes to stdout and the webhook is one valid JSON object carrying
// placed_at and placed_path, and a valid record keeps all its keys.
func FuzzPlacedRecord(f *testing.F) {
	f.Add([]byte(`{"path":"in/ep1.wav","verdict":"pass"}`), "/qc/passed/ep1.wav")
	f.Add([]byte(`{}`), "")
	f.Add([]byte(` {"a":1} `), "x\ny")
	f.Add([]byte(`not json`), "/p")
	f.Fuzz(func(t *testing.T, record []byte, dest string) {
		got := placedRecord(record, time.Unix(0, 0), dest)
		var m map[string]any
		if err := json.Unmarshal(got, &m); err != nil {
			var in map[string]any
			if json.Unmarshal(record, &in) == nil {
				t.Fatalf("valid record %q became invalid %q: %v", record, got, err)
			}
			return // the judge's record was not an object: garbage in
		}
		if _, ok := m["placed_at"]; !ok {
			t.Fatalf("no placed_at in %q", got)
		}
		var in map[string]any
		if json.Unmarshal(record, &in) == nil {
			for k := range in {
				if _, ok := m[k]; !ok && k != "placed_at" && k != "placed_path" {
					t.Fatalf("key %q lost: %q", k, got)
				}
			}
		}
	})
}
