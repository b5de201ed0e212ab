package leftovers

import (
	"strconv"
	"strings"
	"testing"
)

// FuzzPidOf: any name reads as a PID or not without panicking, and a PID it
// reads is positive and written in the name right after the prefix.
func FuzzPidOf(f *testing.F) {
	for _, s := range []string{"kweigh-serve-123-456", "kweigh-serve--1", "kweigh-serve-99999999999-x", "kweigh-serve-7-", ".a.wav.kweigh-12-3.tmp", "kweigh-serve-+5-1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, name string) {
		for _, affix := range [][2]string{{"kweigh-serve-", ""}, {".a.wav.kweigh-", ".tmp"}} {
			pid, ok := pidOf(name, affix[0], affix[1])
			if !ok {
				continue
			}
			if pid <= 0 || !strings.HasPrefix(name, affix[0]+strconv.Itoa(pid)+"-") {
				t.Errorf("%q read as pid %d", name, pid)
			}
		}
	})
}
