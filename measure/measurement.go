// Package measure runs one delivered file through a decoder, the BS.1770
// loudness engine and the signal-hygiene probes, and returns a Measurement:
// the per-file record that `kweigh measure` prints and `kweigh check` judges.
//
// It exists as its own package because neither neighbour can hold it:
// package decode knows nothing of loudness and package loudness knows nothing
// of files.
package measure

import (
	"fmt"
	"strconv"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/loudness"
)

// Measurement is the record of one file. Its JSON form is kweigh's stable
// machine output (documented in README.md); a figure the standard leaves
// undefined is null, with a Notes entry saying why.
type Measurement struct {
	Path          string   `json:"path"`
	Format        string   `json:"format"` // container: wav, rf64, bw64, flac, mp3, aiff, aifc
	Codec         string   `json:"codec"`
	SampleRateHz  int      `json:"sample_rate_hz"`
	Channels      int      `json:"channels"`
	ChannelLayout []string `json:"channel_layout"`
	// LayoutSource says where ChannelLayout came from: "file" (channel mask
	// or the format's defined order), "default" (by channel count) or "user"
	// (--layout).
	LayoutSource string `json:"layout_source"`
	// BitsPerSample is the file's bit depth; 0 (JSON null) for lossy
	// formats, which have none.
	BitsPerSample BitDepth `json:"bits_per_sample"`
	SampleFormat  string   `json:"sample_format"` // int or float
	BitRateKbps   float64  `json:"bit_rate_kbps,omitempty"`
	Mode          string   `json:"mode,omitempty"`
	// BitRateMode is "cbr", "vbr" or "abr" for compressed files whose
	// decoder can tell; absent otherwise.
	BitRateMode string `json:"bit_rate_mode,omitempty"`
	// Tags lists the metadata blocks the file carries (e.g. "id3v2.4",
	// "id3v1"); absent when there are none, never null.
	Tags      []string `json:"tags,omitempty"`
	DurationS float64  `json:"duration_s"`

	IntegratedLUFS   *float64 `json:"integrated_lufs"`
	LoudnessRangeLU  *float64 `json:"loudness_range_lu"`
	TruePeakDBTP     *float64 `json:"true_peak_dbtp"`
	SamplePeakDBFS   *float64 `json:"sample_peak_dbfs"`
	MaxMomentaryLUFS *float64 `json:"max_momentary_lufs"`
	MaxShortTermLUFS *float64 `json:"max_short_term_lufs"`
	// Per channel, in stream order; null for a channel of digital silence.
	ChannelTruePeakDBTP   []*float64 `json:"channel_true_peak_dbtp"`
	ChannelSamplePeakDBFS []*float64 `json:"channel_sample_peak_dbfs"`

	// StereoDownmix is the loudness of the Lo/Ro fold-down of a surround
	// file (see DownmixMethod); absent for mono and stereo files.
	StereoDownmix *Downmix `json:"stereo_downmix,omitempty"`

	Signal Signal       `json:"signal"`
	Bext   *decode.Bext `json:"bext,omitempty"`

	// Damaged is set when decoding found the audio damaged (truncated data,
	// CRC or MD5 mismatch): the figures describe only what could be decoded.
	Damaged string `json:"damaged,omitempty"`
	// Undeclared is set when the file holds audio-like data after the
	// audio its header declares (bytes that are neither chunks nor tags):
	// the figures cover only the declared audio.
	Undeclared *decode.Undeclared `json:"undeclared_data,omitempty"`
	Notes      []string           `json:"notes"`
	// Error is set when the file could not be measured at all; the other
	// fields are then zero.
	Error string `json:"error,omitempty"`
	// Err is the error behind Error, for callers that need to tell kinds
	// apart (errors.Is(m.Err, decode.ErrUnknownFormat)); not part of the
	// JSON record.
	Err error `json:"-"`

	// Series is the engine's 10 Hz time series, kept for plots; not part of
	// the JSON record.
	Series *loudness.Series `json:"-"`
}

// BitDepth is a bit depth in bits, 0 for "none" (a lossy format), which
// JSON writes as null: an MP3 has no bit depth, not a depth of 0 or 16.
type BitDepth int

// MarshalJSON writes the depth, or null for 0.
func (b BitDepth) MarshalJSON() ([]byte, error) {
	if b == 0 {
		return []byte("null"), nil
	}
	return strconv.AppendInt(nil, int64(b), 10), nil
}

// UnmarshalJSON reads a depth or null (0).
func (b *BitDepth) UnmarshalJSON(data []byte) error {
	if string(data) == "null" {
		*b = 0
		return nil
	}
	n, err := strconv.Atoi(string(data))
	if err != nil {
		return fmt.Errorf("bits_per_sample: %q is not a whole number or null", data)
	}
	*b = BitDepth(n)
	return nil
}

// Signal holds the signal-hygiene findings that delivery QC looks at besides
// loudness.
type Signal struct {
	// SilenceThresholdDBFS is the sample-peak level below which audio counts
	// as silence for the two figures below (common practice, no published
	// source: −60 dBFS).
	SilenceThresholdDBFS float64 `json:"silence_threshold_dbfs"`
	LeadingSilenceS      float64 `json:"leading_silence_s"`
	TrailingSilenceS     float64 `json:"trailing_silence_s"`

	// ClippedSamples counts samples at the format's full-scale code (or
	// |x| ≥ 1.0 for float); ClipRuns counts runs of at least
	// ClipRunMinSamples consecutive such samples in one channel;
	// LongestClipRun is the longest run.
	ClippedSamples    int64 `json:"clipped_samples"`
	ClipRuns          int64 `json:"clip_runs"`
	ClipRunMinSamples int   `json:"clip_run_min_samples"`
	LongestClipRun    int64 `json:"longest_clip_run"`

	// DCOffset is each channel's mean sample value (full scale = 1.0).
	DCOffset []float64 `json:"dc_offset"`

	// Correlation is the Pearson correlation of the front L/R pair over the
	// whole file (null without such a pair, or when one side is silent);
	// MinWindowCorrelation is the lowest over 3 s windows with signal.
	Correlation          *float64 `json:"correlation"`
	MinWindowCorrelation *float64 `json:"min_window_correlation"`
	// DualMono is true when a two-channel file carries the same signal on
	// both channels: every sample within one LSB, or L−R at least
	// DualMonoSideToMidDB (50 dB) below L+R in energy, which is the same
	// signal up to independent dither.
	DualMono bool `json:"dual_mono"`
	// SilentChannels lists the labels of channels that hold digital silence
	// or stay below the silence threshold throughout.
	SilentChannels []string `json:"silent_channels"`
}
