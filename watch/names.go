package watch

import (
	"fmt"
	"path"
	"strings"

	"github.com/kweigh/kweigh/rules"
)

// temporarySuffixes are the endings upload and download tools give a file
// while they are still writing it (common practice, no published source:
// browsers use .crdownload and .part, WinSCP .filepart, rsync and many
// scripts .tmp or .partial).
var temporarySuffixes = []string{".part", ".partial", ".tmp", ".crdownload", ".filepart"}

// specFileName is the folder spec file; it governs its folder and is never a
// delivery, so it is never taken.
const specFileName = rules.SpecFileName

// Names decides which names in an inbox are deliveries.
type Names struct {
	patterns []string
}

// NewNames checks the --ignore patterns (path.Match syntax, matched against
// the base name, or against the path below the inbox when the pattern holds a
// slash).
func NewNames(patterns []string) (Names, error) {
	for _, p := range patterns {
		if _, err := path.Match(p, ""); err != nil {
			return Names{}, fmt.Errorf("--ignore %q: %w", p, err)
		}
	}
	return Names{patterns: patterns}, nil
}

// Temporary reports whether the file at rel (slash-separated, below the
// inbox) must be left alone: a hidden name anywhere on its path, a temporary
// suffix, the folder spec file, or an --ignore pattern.
func (n Names) Temporary(rel string) bool {
	for _, part := range strings.Split(rel, "/") {
		if strings.HasPrefix(part, ".") {
			return true
		}
	}
	base := path.Base(rel)
	lower := strings.ToLower(base)
	if lower == specFileName {
		return true
	}
	for _, s := range temporarySuffixes {
		if strings.HasSuffix(lower, s) {
			return true
		}
	}
	for _, p := range n.patterns {
		subject := base
		if strings.Contains(p, "/") {
			subject = rel
		}
		if ok, _ := path.Match(p, subject); ok {
			return true
		}
	}
	return false
}

// numbered returns rel with the numbered suffix n (none for 1) before its
// extension: "show/ep1.wav", "show/ep1 (2).wav", …
func numbered(rel string, n int) string {
	if n <= 1 {
		return rel
	}
	dir, base := path.Split(rel)
	ext := path.Ext(base)
	if ext == base { // ".wav" alone is a name, not an extension
		ext = ""
	}
	return fmt.Sprintf("%s%s (%d)%s", dir, strings.TrimSuffix(base, ext), n, ext)
}
