package audiotest

import (
	"os"
	"path/filepath"
	"testing"
)

// Fixture returns the bytes of testdata/name in the calling test's package
// directory; tb fails if the file cannot be read.
func Fixture(tb testing.TB, name string) []byte {
	tb.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		tb.Fatal(err)
	}
	return b
}

// FixtureWAV reads testdata/name with ReadSourceWAV; tb fails if it cannot.
func FixtureWAV(tb testing.TB, name string) *SourceWAV {
	tb.Helper()
	w, err := ReadSourceWAV(filepath.Join("testdata", name))
	if err != nil {
		tb.Fatal(err)
	}
	return w
}
