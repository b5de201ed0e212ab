package measure_test

import (
	"bytes"
	"context"
	"fmt"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
)

// ExampleStream measures a line-up tone a studio might put at the head of
// a reel: 10 s of 997 Hz at -23 dBFS on both channels of a 48 kHz 24-bit
// WAV, built in memory. EBU Tech 3341 test 1 (from memory per
// SOURCES.md §3) expects -23.0 LUFS; the true and sample peaks are the
// tone's amplitude, -23 dBFS. (Lower your monitors before playing any
// line-up tone.)
func ExampleStream() {
	a := dbfs(-23)
	file := wavBytes(2, 24, false, 0, tone(10, a, a))
	d, err := decode.New(bytes.NewReader(file))
	if err != nil {
		fmt.Println(err)
		return
	}
	m := measure.Stream(context.Background(), "line-up.wav", d, measure.Options{})
	fmt.Printf("%s: %s %d Hz %d-bit, %d channels %v, %.1f s\n",
		m.Path, m.Format, m.SampleRateHz, m.BitsPerSample, m.Channels, m.ChannelLayout, m.DurationS)
	fmt.Printf("integrated %.1f LUFS, true peak %.1f dBTP, sample peak %.1f dBFS\n",
		*m.IntegratedLUFS, *m.TruePeakDBTP, *m.SamplePeakDBFS)
	fmt.Printf("correlation %.2f, dual mono %v\n", *m.Signal.Correlation, m.Signal.DualMono)
	// Output:
	// line-up.wav: wav 48000 Hz 24-bit, 2 channels [L R], 10.0 s
	// integrated -23.0 LUFS, true peak -23.0 dBTP, sample peak -23.0 dBFS
	// correlation 1.00, dual mono true
}

// ExampleUndeclaredText words what a header leaves out: here a WAV whose
// data chunk declares 10 s of 48 kHz mono 16-bit audio while 10 s more
// follow it.
func ExampleUndeclaredText() {
	u := &decode.Undeclared{Offset: 960044, Bytes: 960000, Seconds: 10}
	fmt.Println(measure.UndeclaredText(10, u))
	// Output:
	// the header declares 10.0 s but 10.0 s more audio-like data follows (960000 bytes from byte 960044 that are neither chunks nor tags)
}

// ExampleParseGroups reads the --groups syntax of an 8-channel delivery
// carrying a 5.1 mix and a stereo mix.
func ExampleParseGroups() {
	groups, _, err := measure.ParseGroups("main=1-6:5.1,stereo=7-8:stereo")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, g := range groups {
		fmt.Println(g.Name, g.Channels, g.Layout)
	}
	// Output:
	// main [1 2 3 4 5 6] [L R C LFE Ls Rs]
	// stereo [7 8] [L R]
}

// Groups named by audio stream (for MXF, MOV and MP4 deliveries that
// carry each programme as its own stream): streams 1 and 2 whole, and
// channel 1 of stream 3. The streams become file channels when a file is
// measured (decode.Info.Streams says where each stream's channels are).
func ExampleParseGroups_streams() {
	groups, _, err := measure.ParseGroups("main=s1:5.1,stereo=s2:stereo,dub=s3/1")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, g := range groups {
		fmt.Println(g.Name, "streams", g.Streams, "channels", g.Channels, g.Layout)
	}
	// Output:
	// main streams [1] channels [] [L R C LFE Ls Rs]
	// stereo streams [2] channels [] [L R]
	// dub streams [3] channels [1] []
}
