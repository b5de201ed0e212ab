package serve

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestParseSize: units after IEC 80000-13 (SI prefixes are powers of
// 1000, binary prefixes powers of 1024).
func TestParseSize(t *testing.T) {
	cases := []struct {
		in   string
		want int64
		ok   bool
	}{
		{"1048576", 1 << 20, true},
		{"500MB", 500_000_000, true},
		{"50MiB", 50 << 20, true},
		{"8GiB", 8 << 30, true},
		{"8gib", 8 << 30, true},
		{" 1.5GB ", 1_500_000_000, true},
		{"10 kB", 10_000, true},
		{"2TiB", 2 << 40, true},
		{"512B", 512, true},
		{"", 0, false},
		{"MB", 0, false},
		{"0", 0, false},
		{"-5MB", 0, false},
		{"5XB", 0, false},
		{"1.2.3MB", 0, false},
		{"99999999TiB", 0, false},
	}
	for _, c := range cases {
		got, err := ParseSize(c.in)
		if (err == nil) != c.ok || got != c.want {
			t.Errorf("ParseSize(%q) = %d, %v; want %d (ok %v)", c.in, got, err, c.want, c.ok)
		}
		if err != nil && !strings.Contains(err.Error(), "size") {
			t.Errorf("ParseSize(%q): error %q does not say what it is about", c.in, err)
		}
	}
}

// TestCheckExposure: loopback needs nothing; anything else needs tokens or
// an explicit --no-auth.
func TestCheckExposure(t *testing.T) {
	toks := NewTokens("t")
	cases := []struct {
		addr   string
		tokens *Tokens
		noAuth bool
		ok     bool
	}{
		{"127.0.0.1:7350", nil, false, true},
		{"127.8.9.1:7350", nil, false, true},
		{"[::1]:7350", nil, false, true},
		{"localhost:7350", nil, false, true},
		{"0.0.0.0:7350", nil, false, false},
		{":7350", nil, false, false},
		{"192.0.2.10:7350", nil, false, false},
		{"[::]:7350", nil, false, false},
		{"0.0.0.0:7350", toks, false, true},
		{"0.0.0.0:7350", nil, true, true},
		{"no-port", nil, false, false},
	}
	for _, c := range cases {
		err := CheckExposure(c.addr, c.tokens, c.noAuth)
		if (err == nil) != c.ok {
			t.Errorf("CheckExposure(%q, tokens %v, no-auth %v) = %v", c.addr, c.tokens != nil, c.noAuth, err)
		}
	}
}

// TestLabel: the client's name is a label: last element only, no control
// characters, bounded.
func TestLabel(t *testing.T) {
	cases := map[string]string{
		"ep7.wav":                    "ep7.wav",
		"../../etc/passwd":           "passwd",
		`C:\Users\mix\Tidewater.wav`: "Tidewater.wav",
		"take [1].wav":               "take [1].wav",
		"bad\x1b[2Jname.wav":         "bad[2Jname.wav",
		"rtl\u202egnp.wav":           "rtlgnp.wav",
		"..":                         "",
		"/":                          "",
		"":                           "",
		strings.Repeat("é", 300):     strings.Repeat("é", 100),
	}
	for in, want := range cases {
		if got := Label(in); got != want {
			t.Errorf("Label(%q) = %q, want %q", in, got, want)
		}
	}
}

// TestLoadTokens: one per line, comments and blanks skipped, an empty file
// refused, constant-time matching of every token.
func TestLoadTokens(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "tokens")
	os.WriteFile(p, []byte("# ingest robots\nkestrel-7f3a9c\n\n  harbour-22e1  \n"), 0o600)
	toks, err := LoadTokens(p)
	if err != nil {
		t.Fatal(err)
	}
	if toks.Len() != 2 || !toks.Allows("kestrel-7f3a9c") || !toks.Allows("harbour-22e1") || toks.Allows("kestrel") || toks.Allows("") {
		t.Errorf("tokens: %d, matching wrong", toks.Len())
	}
	empty := filepath.Join(dir, "empty")
	os.WriteFile(empty, []byte("# nothing yet\n"), 0o600)
	if _, err := LoadTokens(empty); err == nil || !strings.Contains(err.Error(), empty) {
		t.Errorf("empty token file: %v", err)
	}
	if _, err := LoadTokens(dir); err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Errorf("a folder as token file: %v", err)
	}
	spaced := filepath.Join(dir, "spaced")
	os.WriteFile(spaced, []byte("two words\n"), 0o600)
	if _, err := LoadTokens(spaced); err == nil || !strings.Contains(err.Error(), ":1:") {
		t.Errorf("token with a space: %v", err)
	}
}

// FuzzParseSize: never a panic; an accepted size is positive.
func FuzzParseSize(f *testing.F) {
	for _, s := range []string{"8GiB", "500MB", "1.5gb", "", "1e9", "..", "9999999999999999999TiB"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		n, err := ParseSize(s)
		if err == nil && n < 1 {
			t.Errorf("ParseSize(%q) = %d without an error", s, n)
		}
	})
}

// FuzzLabel: a label never holds a path separator or a control character
// and is at most 200 bytes.
func FuzzLabel(f *testing.F) {
	for _, s := range []string{"ep7.wav", "../x", "a\x00b", `c:\x\y.wav`, "\u202e"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		l := Label(s)
		if strings.ContainsAny(l, "/\\\x00\n\r\x1b") || len(l) > maxLabel {
			t.Errorf("Label(%q) = %q", s, l)
		}
	})
}
