package mp3

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"sync/atomic"
	"testing"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// countingSplitter is an MP3 decoder that counts the sections asked of it,
// so a test knows that package measure took the split path.
type countingSplitter struct {
	*Decoder
	sections atomic.Int64 // Section is called from the section goroutines
}

func (c *countingSplitter) Section(from, to int64) (decode.Decoder, error) {
	c.sections.Add(1)
	return c.Decoder.Section(from, to)
}

// TestMeasureOnTwoCoresSameFigures measures a 70 s lame encode (CBR and
// VBR, 48 kHz stereo with independent channels) in one pass and in
// sections on two cores: package measure must split it (sections were
// asked for) and every figure of the record must equal the one-pass
// figure within 1e-9 (the bound issue 14 sets for figures whose sums are
// added in another order; common practice, no published source).
func TestMeasureOnTwoCoresSameFigures(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "programme.wav")
	writeWAV16(t, src, 48000, 2, longProgramme(70))
	for _, tt := range []struct {
		name string
		opts []string
	}{
		{"cbr", []string{"-b", "160"}},
		{"vbr", []string{"-V4"}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			b := lameEncode(t, src, tt.name+".mp3", tt.opts...)
			path := filepath.Join(dir, tt.name+".mp3")
			run := func(cores *measure.Cores) (*measure.Measurement, int64) {
				d, err := New(bytes.NewReader(b), int64(len(b)))
				if err != nil {
					t.Fatal(err)
				}
				c := &countingSplitter{Decoder: d}
				return measure.Stream(context.Background(), path, c, measure.Options{Cores: cores}), c.sections.Load()
			}
			one, _ := run(nil)
			two, sections := run(measure.NewCores(2))
			if one.Error != "" || two.Error != "" || one.Damaged != "" {
				t.Fatalf("errors: %q, %q, damaged %q", one.Error, two.Error, one.Damaged)
			}
			if sections < 2 {
				t.Fatalf("%d sections asked for on two cores: the split path did not run", sections)
			}
			if d := sameJSON(t, one, two); d != "" {
				t.Errorf("two cores differ from one pass: %s", d)
			}
		})
	}
}

// sameJSON compares two values by their JSON, numbers within 1e-9, and
// returns the first difference.
func sameJSON(t *testing.T, a, b any) string {
	t.Helper()
	var x, y any
	for _, p := range []struct {
		v   any
		out *any
	}{{a, &x}, {b, &y}} {
		j, err := json.Marshal(p.v)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(j, p.out); err != nil {
			t.Fatal(err)
		}
	}
	var walk func(x, y any, path string) string
	walk = func(x, y any, path string) string {
		switch xv := x.(type) {
		case float64:
			yv, ok := y.(float64)
			if !ok || math.Abs(xv-yv) > 1e-9 {
				return fmt.Sprintf("%s: %v, one pass %v", path, y, x)
			}
		case map[string]any:
			yv, ok := y.(map[string]any)
			if !ok || len(xv) != len(yv) {
				return fmt.Sprintf("%s: %v, one pass %v", path, y, x)
			}
			for k := range xv {
				if d := walk(xv[k], yv[k], path+"."+k); d != "" {
					return d
				}
			}
		case []any:
			yv, ok := y.([]any)
			if !ok || len(xv) != len(yv) {
				return fmt.Sprintf("%s: %d elements, one pass %d", path, len(yv), len(xv))
			}
			for i := range xv {
				if d := walk(xv[i], yv[i], fmt.Sprintf("%s[%d]", path, i)); d != "" {
					return d
				}
			}
		default:
			if x != y {
				return fmt.Sprintf("%s: %v, one pass %v", path, y, x)
			}
		}
		return ""
	}
	return walk(x, y, "")
}
