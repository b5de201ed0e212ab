package rules

import (
	"strings"
	"testing"
)

// TestRootMarker: only a file whose one key is root = true is a boundary
// marker (README "Which spec applies"); a spec with limits and root = true
// is a spec whose Root is set.
func TestRootMarker(t *testing.T) {
	tests := []struct {
		data string
		want bool
	}{
		{"root = true\n", true},
		{"# delivery tree of Saltmarsh FM\nroot = true # stop here\n", true},
		{"root = false\n", false},
		{"root = \"yes\"\n", false},
		{"root = true\nextends = \"ebu-r128\"\n", false},
		{"", false},
		{"[loudness]\nroot = true\n", false},
		{"root = true\n" + strings.Repeat("# padding\n", 500), false}, // over the size bound
		{"root = ", false},
	}
	for _, tc := range tests {
		if got := IsRootMarker([]byte(tc.data)); got != tc.want {
			t.Errorf("IsRootMarker(%.40q) = %v, want %v", tc.data, got, tc.want)
		}
	}
	s, err := Parse("kweigh.toml", []byte("name = \"saltmarsh-fm\"\nroot = true\nextends = \"ebu-r128\"\n"))
	if err != nil || !s.Root {
		t.Errorf("Parse with root = true: %v, Root %v", err, s != nil && s.Root)
	}
	if _, err := Parse("kweigh.toml", []byte("root = 1\nextends = \"ebu-r128\"\n")); err == nil || !strings.Contains(err.Error(), "kweigh.toml:1: root: must be true or false") {
		t.Errorf("root = 1: %v", err)
	}
}

// FuzzRootMarker: any input returns without panicking, quickly.
func FuzzRootMarker(f *testing.F) {
	for _, seed := range []string{"root = true\n", "root = false", "root = {a = {b = {c = 1}}}", "[[root]]\n", "root = true\nroot = true\n", "\xff\xfe"} {
		f.Add([]byte(seed))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		if IsRootMarker(data) && !strings.Contains(string(data), "root") {
			t.Errorf("%q is no root marker", data)
		}
	})
}
