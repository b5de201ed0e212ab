// Package timecode counts SMPTE time-and-control code (SMPTE ST 12-1):
// frame labels HH:MM:SS:FF at the television and film frame rates, with
// drop-frame counting at 29.97 and 59.94 frames per second.
//
// It is its own package because three neighbours need it and none owns it:
// measure stamps events with timecode, reports prints it, and the command
// line parses --start-timecode and --fps. It knows nothing of audio files;
// a start comes to it as seconds since midnight (a BWF bext TimeReference
// divided by the sample rate) or as a label.
//
// Drop-frame counting (SMPTE ST 12-1, §4.2.2 in the 2014 edition, from
// memory): at 30000/1001 frames per second the labels 00 and 01 are skipped
// at the start of every minute except minutes 00, 10, 20, 30, 40 and 50, so
// the label keeps within a few frames of clock time; at 60000/1001 the
// labels 00 to 03 are skipped. No frames are dropped, only labels.
package timecode

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Rate is a frame rate: Num/Den frames per second, counted with drop-frame
// labels when Drop is set (only at 30000/1001 and 60000/1001).
type Rate struct {
	Num, Den int
	Drop     bool
}

// Common rates.
var (
	Rate23976   = Rate{Num: 24000, Den: 1001}
	Rate24      = Rate{Num: 24, Den: 1}
	Rate25      = Rate{Num: 25, Den: 1}
	Rate2997DF  = Rate{Num: 30000, Den: 1001, Drop: true}
	Rate2997NDF = Rate{Num: 30000, Den: 1001}
	Rate30      = Rate{Num: 30, Den: 1}
	Rate50      = Rate{Num: 50, Den: 1}
	Rate5994DF  = Rate{Num: 60000, Den: 1001, Drop: true}
	Rate5994NDF = Rate{Num: 60000, Den: 1001}
	Rate60      = Rate{Num: 60, Den: 1}
)

// Default is the rate used when neither the file nor the user names one:
// 25 frames per second, the European broadcast rate.
var Default = Rate25

// rateNames are the names ParseRate accepts and String writes.
var rateNames = []struct {
	name string
	rate Rate
}{
	{"23.976", Rate23976}, {"24", Rate24}, {"25", Rate25},
	{"29.97df", Rate2997DF}, {"29.97", Rate2997NDF}, {"30", Rate30},
	{"50", Rate50}, {"59.94df", Rate5994DF}, {"59.94", Rate5994NDF}, {"60", Rate60},
}

// RateNames lists the names ParseRate accepts, for help texts.
func RateNames() []string {
	out := make([]string, len(rateNames))
	for i, r := range rateNames {
		out[i] = r.name
	}
	return out
}

// ParseRate reads a frame rate name: 23.976, 24, 25, 29.97, 29.97df, 30,
// 50, 59.94, 59.94df or 60 ("df" for drop-frame counting; "ndf" is accepted
// after 29.97 and 59.94 and means non-drop).
func ParseRate(s string) (Rate, error) {
	n := strings.ToLower(strings.TrimSpace(s))
	n = strings.TrimSuffix(strings.ReplaceAll(n, " ", ""), "ndf")
	n = strings.Replace(n, "drop-frame", "df", 1)
	for _, r := range rateNames {
		if r.name == n {
			return r.rate, nil
		}
	}
	return Rate{}, fmt.Errorf("frame rate %q: use one of %s", s, strings.Join(RateNames(), ", "))
}

// FromIXML turns the iXML TIMECODE_RATE ("30000/1001", "25/1", or a plain
// number) and TIMECODE_FLAG ("DF" or "NDF") values into a Rate. It accepts
// only the rates ParseRate knows.
func FromIXML(rate, flag string) (Rate, error) {
	rate = strings.TrimSpace(rate)
	var r Rate
	if num, den, ok := strings.Cut(rate, "/"); ok {
		n, err1 := strconv.Atoi(strings.TrimSpace(num))
		d, err2 := strconv.Atoi(strings.TrimSpace(den))
		if err1 != nil || err2 != nil || n <= 0 || d <= 0 {
			return Rate{}, fmt.Errorf("iXML TIMECODE_RATE %q is not a ratio of whole numbers", rate)
		}
		r = Rate{Num: n, Den: d}
	} else {
		p, err := ParseRate(rate)
		if err != nil {
			return Rate{}, fmt.Errorf("iXML TIMECODE_RATE %q: %w", rate, err)
		}
		r = Rate{Num: p.Num, Den: p.Den}
	}
	r.Drop = strings.EqualFold(strings.TrimSpace(flag), "DF")
	for _, k := range rateNames {
		if k.rate.Num*r.Den == r.Num*k.rate.Den && k.rate.Drop == r.Drop {
			return k.rate, nil
		}
	}
	return Rate{}, fmt.Errorf("iXML TIMECODE_RATE %q with TIMECODE_FLAG %q is not a rate kweigh counts", rate, flag)
}

// String names the rate as ParseRate reads it, e.g. "25" or "29.97df".
func (r Rate) String() string {
	for _, k := range rateNames {
		if k.rate == r {
			return k.name
		}
	}
	return fmt.Sprintf("%d/%d", r.Num, r.Den)
}

// FPS is the frame rate in frames per second.
func (r Rate) FPS() float64 { return float64(r.Num) / float64(r.Den) }

// nominal is the whole number of frame labels per second (30 for 29.97).
func (r Rate) nominal() int64 {
	if r.Den <= 0 || r.Num <= 0 {
		return 0
	}
	return int64((r.Num + r.Den - 1) / r.Den)
}

// dropped is how many labels drop-frame counting skips per minute: 2 at
// 29.97, 4 at 59.94, 0 otherwise.
func (r Rate) dropped() int64 {
	if !r.Drop {
		return 0
	}
	return r.nominal() / 15
}

// FramesPerDay is the number of frames from 00:00:00:00 to the next
// midnight, where the label wraps.
func (r Rate) FramesPerDay() int64 {
	return 24 * 6 * r.framesPer10Min()
}

func (r Rate) framesPer10Min() int64 {
	return 10*60*r.nominal() - 9*r.dropped()
}

// Timecode is a frame count since 00:00:00:00 at a Rate.
type Timecode struct {
	Rate   Rate
	Frames int64
}

// FromSeconds is the frame in which the instant s seconds after midnight
// falls (a frame is labelled by its start, so 12.34 s at 25 fps is frame
// 308: 00:00:12:08). The count wraps at 24 hours.
func FromSeconds(r Rate, s float64) Timecode {
	// A tiny allowance keeps an instant exactly on a frame boundary (10 h at
	// 25 fps) from falling a frame short after binary rounding.
	day := r.FramesPerDay()
	if day <= 0 {
		return Timecode{Rate: r} // no frame rate: no frames to count
	}
	f := int64(math.Floor(s*float64(r.Num)/float64(r.Den) + 1e-7))
	f %= day
	if f < 0 {
		f += day
	}
	return Timecode{Rate: r, Frames: f}
}

// Seconds is the instant the frame starts, in seconds after midnight.
func (t Timecode) Seconds() float64 {
	if t.Rate.Num <= 0 || t.Rate.Den <= 0 {
		return 0
	}
	return float64(t.Frames) * float64(t.Rate.Den) / float64(t.Rate.Num)
}

// Add moves the timecode by n frames, wrapping at 24 hours.
func (t Timecode) Add(n int64) Timecode {
	day := t.Rate.FramesPerDay()
	if day <= 0 {
		return t // no frame rate: no frames to count
	}
	f := (t.Frames + n) % day
	if f < 0 {
		f += day
	}
	return Timecode{Rate: t.Rate, Frames: f}
}

// Fields are the label's hours, minutes, seconds and frames.
func (t Timecode) Fields() (h, m, s, f int64) {
	n := t.Frames
	r := t.Rate
	if d := r.dropped(); d > 0 {
		// Add back the labels skipped before this frame: 9·d per whole ten
		// minutes, d per further minute (the first minute of each ten
		// skips none).
		per10 := r.framesPer10Min()
		perMin := 60*r.nominal() - d
		tens, rest := n/per10, n%per10
		n += 9 * d * tens
		if rest >= d {
			n += d * ((rest - d) / perMin)
		}
	}
	fps := r.nominal()
	if fps <= 0 {
		// The zero Rate (or a corrupt one): no labels to count in.
		return 0, 0, 0, n
	}
	f = n % fps
	s = n / fps % 60
	m = n / (fps * 60) % 60
	h = n / (fps * 3600)
	return h, m, s, f
}

// String writes the label HH:MM:SS:FF, with a semicolon before the frames
// for drop-frame counting (HH:MM:SS;FF), the usual way of telling them
// apart.
func (t Timecode) String() string {
	if t.Rate.Num <= 0 || t.Rate.Den <= 0 {
		return fmt.Sprintf("frame %d (no frame rate)", t.Frames)
	}
	h, m, s, f := t.Fields()
	sep := ':'
	if t.Rate.Drop {
		sep = ';'
	}
	return fmt.Sprintf("%02d:%02d:%02d%c%02d", h, m, s, sep, f)
}

// Parse reads a label HH:MM:SS:FF (or HH:MM:SS;FF, or with '.' or ','
// before the frames) at rate r. A frame field at or beyond the rate, and a
// label that drop-frame counting skips, are errors.
func Parse(s string, r Rate) (Timecode, error) {
	bad := func(why string) (Timecode, error) {
		return Timecode{}, fmt.Errorf("timecode %q: %s", s, why)
	}
	parts := strings.FieldsFunc(strings.TrimSpace(s), func(c rune) bool {
		return c == ':' || c == ';' || c == '.' || c == ','
	})
	if len(parts) != 4 {
		return bad("want HH:MM:SS:FF")
	}
	var v [4]int64
	for i, p := range parts {
		if len(p) == 0 || len(p) > 2 {
			return bad("each field has one or two digits")
		}
		n, err := strconv.ParseInt(p, 10, 64)
		if err != nil || n < 0 {
			return bad("each field has one or two digits")
		}
		v[i] = n
	}
	h, m, sec, f := v[0], v[1], v[2], v[3]
	switch {
	case h > 23:
		return bad("hours run from 00 to 23")
	case m > 59 || sec > 59:
		return bad("minutes and seconds run from 00 to 59")
	case f >= r.nominal():
		return bad(fmt.Sprintf("frames run from 00 to %02d at %s fps", r.nominal()-1, r))
	}
	d := r.dropped()
	if d > 0 && sec == 0 && m%10 != 0 && f < d {
		return bad(fmt.Sprintf("drop-frame counting skips frames 00 to %02d at the start of minute %02d", d-1, m))
	}
	fps := r.nominal()
	n := ((h*60+m)*60+sec)*fps + f
	if d > 0 {
		totalMin := h*60 + m
		n -= d * (totalMin - totalMin/10)
	}
	return Timecode{Rate: r, Frames: n}, nil
}

// Clock writes a time from zero as h:mm:ss.s (tenths), the way kweigh shows
// times when no start timecode is known.
func Clock(s float64) string {
	if s < 0 || math.IsNaN(s) || math.IsInf(s, 0) {
		s = 0
	}
	tenths := int64(math.Floor(s*10 + 1e-7))
	h := tenths / 36000
	m := tenths / 600 % 60
	sec := tenths / 10 % 60
	return fmt.Sprintf("%d:%02d:%02d.%d", h, m, sec, tenths%10)
}

// Start is where a file's timecode starts: the label of its first sample
// and the rate it counts in. The zero value (Known false) means no start
// is known and times are shown from zero.
type Start struct {
	Known bool
	// At is the first sample's timecode.
	At Timecode
	// seconds is the first sample's instant after midnight, kept exact
	// (a bext TimeReference need not fall on a frame boundary).
	seconds float64
}

// StartAt is a start at the given label.
func StartAt(t Timecode) Start {
	return Start{Known: true, At: t, seconds: t.Seconds()}
}

// StartFromSamples is a start from a count of samples since midnight at a
// sample rate (the BWF bext TimeReference, EBU Tech 3285 §2.3).
func StartFromSamples(samples uint64, sampleRate int, r Rate) Start {
	s := float64(samples) / float64(sampleRate)
	return Start{Known: true, At: FromSeconds(r, s), seconds: s}
}

// Label returns the timecode of the instant t seconds into the file, or
// h:mm:ss.s from zero when no start is known.
func (st Start) Label(t float64) string {
	if !st.Known {
		return Clock(t)
	}
	return FromSeconds(st.At.Rate, st.seconds+t).String()
}
