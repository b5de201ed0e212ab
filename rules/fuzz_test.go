package rules

import (
	"errors"
	"io"
	"os"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/measure"
)

// FuzzParse feeds arbitrary bytes to the spec parser. It must never panic;
// a rejected spec must come back as SpecErrors naming the file; an accepted
// one must describe itself and judge a measurement without panicking. Time
// and memory stay bounded because checkSpecShape refuses deep nesting, long
// dotted keys and oversized files before the TOML library runs. Seeds: the
// house spec, f.Add cases below (among them the 8000 nested inline tables
// that once took seconds and gigabytes) and testdata/fuzz/FuzzParse.
func FuzzParse(f *testing.F) {
	house, err := os.ReadFile("testdata/house-spec.toml")
	if err != nil {
		f.Fatal(err)
	}
	f.Add(house)
	f.Add([]byte("extends = \"aes-td1004\"\n[loudness]\nmax_integrated_lufs = -17\n"))
	f.Add([]byte("[format]\nlayouts = [\"5.1\", \"L,R,C\"]\ncontainers = []\n"))
	f.Add([]byte("description = '''\n[x]\n'''\n[signal]\nmax_clip_runs = 1e3\n"))
	f.Add(nested(8000))
	f.Add([]byte(strings.Repeat("a.", 8000) + "b = 1\n"))
	f.Add([]byte(""))
	f.Add([]byte("name = \"x\"\n"))
	f.Add([]byte("extends = \"podcast\"\n[loudness]\ntarget_lufs = -14\n[format]\nmin_bit_rate_kbps = 96\nbit_rate_modes = [\"cbr\"]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Parse("fuzz.toml", data)
		if err != nil {
			var all SpecErrors
			if !errors.As(err, &all) || len(all) == 0 || all[0].File != "fuzz.toml" {
				t.Fatalf("error %v is not SpecErrors naming the file", err)
			}
			return
		}
		if err := s.Describe(io.Discard); err != nil {
			t.Fatal(err)
		}
		for _, m := range []*measure.Measurement{cleanStereo(-20, -1), cleanMono(-20, -1)} {
			r := Evaluate(s, m)
			if r.Verdict.rank() > Error.rank() || r.Checks == nil {
				t.Fatalf("bad result %+v", r)
			}
		}
	})
}
