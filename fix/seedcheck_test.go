package fix

import (
	"bytes"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestScanSeeds: every seed of FuzzScanLayout is a valid file of its kind,
// so the fuzzer starts from structures the scans accept (RF64 with ds64:
// the data size comes from ds64, EBU Tech 3306).
func TestScanSeeds(t *testing.T) {
	want := map[string]int64{"bwf": 120, "extensible": 80, "rf64": 80, "aiff": 16, "aifc-sowt": 16}
	for name, size := range want {
		raw, err := os.ReadFile(filepath.Join("testdata", "fuzz", "FuzzScanLayout", name))
		if err != nil {
			t.Fatal(err)
		}
		lines := strings.Split(string(raw), "\n")
		q := strings.TrimSuffix(strings.TrimPrefix(lines[1], "[]byte("), ")")
		s, err := strconv.Unquote(q)
		if err != nil {
			t.Fatal(name, err)
		}
		data := []byte(s)
		var l *pcmLayout
		if strings.HasPrefix(name, "aif") {
			l, err = scanAIFF(bytes.NewReader(data), int64(len(data)), false, 16)
		} else {
			l, err = scanWAV(bytes.NewReader(data), int64(len(data)), 24)
		}
		if err != nil || l.dataSize != size {
			t.Errorf("%s: %v, layout %+v, want %d bytes of audio", name, err, l, size)
		}
		if name == "aifc-sowt" && l.bigEndian {
			t.Error("sowt read as big-endian")
		}
		if name == "bwf" && l.bextBody < 0 {
			t.Error("bext not found")
		}
	}
}
