package rules

import "testing"

// TestKeyLines checks the key-position scanner on the TOML forms a spec file
// may use (TOML v1.0.0: tables, dotted and quoted keys, multi-line arrays and
// strings, comments).
func TestKeyLines(t *testing.T) {
	doc := `# comment with key = value
name = "x"   # trailing comment
description = """
fake = 1
[fake]
"""
loudness.target_lufs = -23
"quoted" = 1

[format]
containers = [
  "wav",  # ] in a comment
  "bw64",
]
sample_rates_hz = [48000]
[ "timing" ]
max_trailing_silence_s = 2
[signal]
dual_mono = 'it''s'
inline = { a = 1, b = [2, 3] }
after_inline = 1
odd = "a # b = c"
next = 1
`
	want := map[string]int{
		"name": 2, "description": 3, "loudness.target_lufs": 7, "quoted": 8,
		"format": 10, "format.containers": 11, "format.sample_rates_hz": 15,
		"timing": 16, "timing.max_trailing_silence_s": 17,
		"signal": 18, "signal.dual_mono": 19, "signal.inline": 20, "signal.after_inline": 21,
		"signal.odd": 22, "signal.next": 23,
	}
	got := keyLines([]byte(doc))
	for k, line := range want {
		if got[k] != line {
			t.Errorf("%s: line %d, want %d", k, got[k], line)
		}
	}
	for _, k := range []string{"fake", "fake.fake"} {
		if _, ok := got[k]; ok {
			t.Errorf("%s inside a multi-line string was taken for a key", k)
		}
	}
	// Keys inside inline tables fall back to the enclosing key.
	if n := lineOf(got, "signal.inline.a"); n != 20 {
		t.Errorf("lineOf(signal.inline.a) = %d, want 20", n)
	}
	if n := lineOf(got, "nowhere.at.all"); n != 0 {
		t.Errorf("lineOf(unknown) = %d, want 0", n)
	}
}
