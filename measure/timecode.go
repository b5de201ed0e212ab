package measure

import (
	"fmt"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/timecode"
)

// startOf decides a file's start timecode and frame rate: the rate from
// the options (--fps), else the file's iXML TIMECODE_RATE and
// TIMECODE_FLAG, else timecode.Default (25); the start from the options
// (--start-timecode), else the bext TimeReference (samples since
// midnight, EBU Tech 3285 §2.3), else none (times shown from zero).
func startOf(info decode.Info, opt Options) (timecode.Start, timecode.Rate, string, error) {
	rate, note := timecode.Default, ""
	switch {
	case opt.FPS != nil:
		rate = *opt.FPS
	case info.IXML != nil && info.IXML.TimecodeRate != "":
		r, err := timecode.FromIXML(info.IXML.TimecodeRate, info.IXML.TimecodeFlag)
		if err != nil {
			note = err.Error() + fmt.Sprintf("; timecode counted at %s fps (set --fps)", rate)
		} else {
			rate = r
		}
	}
	switch {
	case opt.StartTimecode != "":
		tc, err := timecode.Parse(opt.StartTimecode, rate)
		if err != nil {
			return timecode.Start{}, rate, note, fmt.Errorf("--start-timecode: %w", err)
		}
		return timecode.StartAt(tc), rate, note, nil
	case info.Bext != nil:
		return timecode.StartFromSamples(info.Bext.TimeReference, info.SampleRate, rate), rate, note, nil
	}
	return timecode.Start{}, rate, note, nil
}
