package measure_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"github.com/kweigh/kweigh/internal/audiotest"
	"github.com/kweigh/kweigh/measure"
)

// Two files of the invented "Kestrel Bay" podcast measured with one budget
// of two cores, as a run with --jobs 2 does: each file holds a core while it
// is measured, and a file of a minute or more is cut into sections on the
// cores that are free. The figures are those of one pass either way.
func ExampleNewCores() {
	dir, err := os.MkdirTemp("", "kweigh-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	cores := measure.NewCores(2)
	for _, f := range []struct {
		name    string
		seconds float64
	}{{"kestrel-bay-trailer.wav", 5}, {"kestrel-bay-episode.wav", 75}} {
		// A 997 Hz tone at −23 dBFS, mono, 8 kHz (a small file). Test tones
		// can damage hearing and loudspeakers at high level: play them low.
		path := filepath.Join(dir, f.name)
		tone := audiotest.PCMWAV(8000, 1, 16, audiotest.Sine(8000, f.seconds, 997, audiotest.DBFS(-23)))
		if err := os.WriteFile(path, tone, 0o644); err != nil {
			fmt.Println(err)
			return
		}
		split := measure.File(context.Background(), path, measure.Options{Cores: cores})
		onePass := measure.File(context.Background(), path, measure.Options{})
		fmt.Printf("%s: %.1f LUFS, the same as one pass: %v\n", f.name, *split.IntegratedLUFS,
			fmt.Sprintf("%.9f", *split.IntegratedLUFS) == fmt.Sprintf("%.9f", *onePass.IntegratedLUFS))
	}
	// Output:
	// kestrel-bay-trailer.wav: -26.0 LUFS, the same as one pass: true
	// kestrel-bay-episode.wav: -26.0 LUFS, the same as one pass: true
}
