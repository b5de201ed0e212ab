package timecode

import (
	"fmt"
	"strings"
	"testing"
)

// TestDropFrameBoundaries: drop-frame labels across the minute and
// ten-minute boundaries. Source of the expected labels: SMPTE ST 12-1:2014
// §4.2.2 (from memory): labels 00 and 01 (29.97) or 00 to 03 (59.94) are
// skipped at every minute not divisible by ten; the two worked examples
// 00:09:59;29 → 00:10:00;00 and 00:00:59;29 → 00:01:00;02 are those of the
// issue. Tolerance: exact (whole frames).
func TestDropFrameBoundaries(t *testing.T) {
	tests := []struct {
		rate       Rate
		from, next string
	}{
		{Rate2997DF, "00:09:59;29", "00:10:00;00"},
		{Rate2997DF, "00:00:59;29", "00:01:00;02"},
		{Rate2997DF, "00:19:59;29", "00:20:00;00"},
		{Rate2997DF, "00:10:59;29", "00:11:00;02"},
		{Rate2997DF, "00:59:59;29", "01:00:00;00"},
		{Rate2997DF, "09:59:59;29", "10:00:00;00"},
		{Rate2997DF, "23:59:59;29", "00:00:00;00"}, // wraps at midnight
		{Rate5994DF, "00:00:59;59", "00:01:00;04"},
		{Rate5994DF, "00:09:59;59", "00:10:00;00"},
		{Rate2997NDF, "00:00:59:29", "00:01:00:00"},
		{Rate25, "10:00:59:24", "10:01:00:00"},
	}
	for _, tt := range tests {
		tc, err := Parse(tt.from, tt.rate)
		if err != nil {
			t.Fatalf("%s at %s: %v", tt.from, tt.rate, err)
		}
		if got := tc.String(); got != tt.from {
			t.Errorf("%s at %s reads back as %s", tt.from, tt.rate, got)
		}
		if got := tc.Add(1).String(); got != tt.next {
			t.Errorf("%s + 1 frame at %s = %s, want %s", tt.from, tt.rate, got, tt.next)
		}
	}
}

// TestDropFrameCounts: frame counts at whole durations. An hour of
// 29.97 DF has 107 892 frames (30·3600 − 2·54 skipped labels; SMPTE ST
// 12-1, from memory) and its label reads 01:00:00;00; a day has 2 589 408.
func TestDropFrameCounts(t *testing.T) {
	if got := (Timecode{Rate: Rate2997DF, Frames: 107892}).String(); got != "01:00:00;00" {
		t.Errorf("frame 107892 at 29.97df = %s, want 01:00:00;00", got)
	}
	if got := Rate2997DF.FramesPerDay(); got != 2589408 {
		t.Errorf("frames per day at 29.97df = %d, want 2589408", got)
	}
	if got := Rate25.FramesPerDay(); got != 2160000 {
		t.Errorf("frames per day at 25 = %d, want 2160000", got)
	}
}

// TestDropFrameRoundTrip: every frame of the first 20 minutes (and a
// stretch around 10 h) prints a label that parses back to the same frame,
// and consecutive frames never repeat or skip a valid label.
func TestDropFrameRoundTrip(t *testing.T) {
	for _, r := range []Rate{Rate2997DF, Rate5994DF, Rate2997NDF, Rate23976} {
		check := func(from, to int64) {
			for n := from; n < to; n++ {
				tc := Timecode{Rate: r, Frames: n}
				back, err := Parse(tc.String(), r)
				if err != nil || back.Frames != n {
					t.Fatalf("%s: frame %d prints %s, parses to %d (%v)", r, n, tc, back.Frames, err)
				}
			}
		}
		check(0, 20*60*int64(r.nominal()))
		ten := FromSeconds(r, 36000).Frames
		check(ten-5000, ten+5000)
	}
}

// TestParseRefuses: labels drop-frame counting skips, and malformed ones.
func TestParseRefuses(t *testing.T) {
	for _, tt := range []struct {
		s    string
		rate Rate
	}{
		{"00:01:00;00", Rate2997DF}, {"00:01:00;01", Rate2997DF}, {"00:01:00;03", Rate5994DF},
		{"00:00:00:25", Rate25}, {"24:00:00:00", Rate25}, {"00:60:00:00", Rate25},
		{"10:00:00", Rate25}, {"aa:00:00:00", Rate25}, {"100:00:00:00", Rate25}, {"", Rate25},
	} {
		if _, err := Parse(tt.s, tt.rate); err == nil {
			t.Errorf("Parse(%q, %s) accepted", tt.s, tt.rate)
		}
	}
}

// TestFromSeconds: an instant falls in the frame that starts at or before
// it. The burst at 12.34 s from a 10:00:00:00 start at 25 fps is in frame
// 10:00:12:08 (12.34 × 25 = 308.5 → frame 308 = 12 s + 8 frames).
func TestFromSeconds(t *testing.T) {
	tests := []struct {
		rate Rate
		s    float64
		want string
	}{
		{Rate25, 36000 + 12.34, "10:00:12:08"},
		{Rate25, 36000, "10:00:00:00"},
		{Rate25, 0.0399, "00:00:00:00"},
		{Rate25, 0.04, "00:00:00:01"},
		{Rate2997DF, 600, "00:10:00;00"},   // 600 s = 17982.02 frames; 17982 frames are 10 min of DF labels
		{Rate24, 86400 + 1, "00:00:01:00"}, // wraps
	}
	for _, tt := range tests {
		if got := FromSeconds(tt.rate, tt.s).String(); got != tt.want {
			t.Errorf("FromSeconds(%s, %v) = %s, want %s", tt.rate, tt.s, got, tt.want)
		}
	}
}

// TestStartFromSamples: a bext TimeReference of 10 h at 48 kHz
// (1 728 000 000 samples since midnight, EBU Tech 3285 §2.3) starts at
// 10:00:00:00, and 12.34 s in reads 10:00:12:08.
func TestStartFromSamples(t *testing.T) {
	st := StartFromSamples(1728000000, 48000, Rate25)
	if got := st.At.String(); got != "10:00:00:00" {
		t.Errorf("start = %s", got)
	}
	if got := st.Label(12.34); got != "10:00:12:08" {
		t.Errorf("12.34 s = %s", got)
	}
	if got := (Start{}).Label(3725.46); got != "1:02:05.4" {
		t.Errorf("no start: %s", got)
	}
}

// TestRates: names and iXML values (iXML specification v2.x, TIMECODE_RATE
// as a ratio and TIMECODE_FLAG DF/NDF; from memory).
func TestRates(t *testing.T) {
	for _, name := range RateNames() {
		r, err := ParseRate(name)
		if err != nil || r.String() != name {
			t.Errorf("ParseRate(%q) = %v, %v", name, r, err)
		}
	}
	for _, tt := range []struct {
		rate, flag string
		want       Rate
	}{
		{"30000/1001", "DF", Rate2997DF}, {"30000/1001", "NDF", Rate2997NDF},
		{"25/1", "NDF", Rate25}, {"24000/1001", "", Rate23976}, {"60000/1001", "df", Rate5994DF},
	} {
		got, err := FromIXML(tt.rate, tt.flag)
		if err != nil || got != tt.want {
			t.Errorf("FromIXML(%q, %q) = %v, %v; want %v", tt.rate, tt.flag, got, err, tt.want)
		}
	}
	for _, bad := range []string{"0/1", "x/y", "31/1", "25/0"} {
		if _, err := FromIXML(bad, ""); err == nil {
			t.Errorf("FromIXML(%q) accepted", bad)
		}
	}
	if _, err := ParseRate("26"); err == nil {
		t.Error("ParseRate(26) accepted")
	}
}

// FuzzParse: no label panics, and every accepted label prints back the
// same fields.
func FuzzParse(f *testing.F) {
	for _, s := range []string{"10:00:00:00", "00:09:59;29", "00:01:00;02", "23:59:59:24", "1:2:3:4", ":::"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, r := range []Rate{Rate25, Rate2997DF, Rate5994DF} {
			tc, err := Parse(s, r)
			if err != nil {
				continue
			}
			back, err := Parse(tc.String(), r)
			if err != nil || back != tc {
				t.Fatalf("%q at %s: %s reads back as %v (%v)", s, r, tc, back, err)
			}
		}
	})
}

func ExampleParse() {
	tc, _ := Parse("00:09:59;29", Rate2997DF)
	fmt.Println(tc, "→", tc.Add(1))
	// Output: 00:09:59;29 → 00:10:00;00
}

func ExampleStart_Label() {
	st := StartAt(Timecode{Rate: Rate25, Frames: 10 * 3600 * 25})
	fmt.Println(st.Label(12.34))
	fmt.Println(Start{}.Label(12.34))
	// Output:
	// 10:00:12:08
	// 0:00:12.3
}

// TestZeroRate: the zero Timecode and Start (a measurement without a known
// start, printed with %v in a log or a test failure) never divide by a
// zero frame rate; they say there is no rate instead.
func TestZeroRate(t *testing.T) {
	var tc Timecode
	if got := tc.String(); got != "frame 0 (no frame rate)" {
		t.Errorf("zero Timecode prints %q", got)
	}
	if h, m, s, f := (Timecode{Frames: 7}).Fields(); h != 0 || m != 0 || s != 0 || f != 7 {
		t.Errorf("fields of 7 frames without a rate: %d %d %d %d", h, m, s, f)
	}
	if got := FromSeconds(Rate{}, 12.34); got.Frames != 0 {
		t.Errorf("FromSeconds without a rate: %d frames", got.Frames)
	}
	if got := tc.Add(5); got != tc {
		t.Errorf("Add without a rate moved to %v", got)
	}
	if got := tc.Seconds(); got != 0 {
		t.Errorf("Seconds without a rate: %v", got)
	}
	if got := fmt.Sprintf("%v", Start{}); strings.Contains(got, "PANIC") {
		t.Errorf("zero Start prints %q", got)
	}
}
