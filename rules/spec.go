package rules

import (
	"fmt"
	"strings"
)

// Spec is what a receiving party requires of a delivered file. A nil
// pointer limit is not checked; a check the spec leaves open may still be
// run with kweigh's QC default and then only warns (see SignalLimits).
type Spec struct {
	// ID names the spec in results ("spec" in JSON) and on the command line:
	// the standard's own name in lower case for built-ins (e.g. "ebu-r128"),
	// the TOML "name" (or the file path) for user specs.
	ID string
	// Title is a one-line human name, e.g. "EBU R 128, production tolerance".
	Title string
	// Description says in a sentence or two what the spec is for.
	Description string
	// Source is the document the spec follows.
	Source Source
	// Extends is the ID of the built-in spec a user spec starts from; empty
	// for built-ins and for user specs that start from scratch.
	Extends string
	// File is the path a user spec was read from; empty for built-ins.
	File string
	// Root is set by "root = true" in a spec file: the search for a folder's
	// spec (from a file's folder upwards) ends at this file's folder.
	Root bool
	// LoudnessUnit is the name the spec's own document gives loudness
	// figures: "LKFS" (ATSC A/85, ARIB TR-B32, OP-59) or "LUFS" (empty means
	// LUFS). The two are the same unit; reports and reasons use the spec's
	// word, JSON keys keep _lufs.
	LoudnessUnit string

	Loudness LoudnessLimits
	Format   FormatLimits
	Timing   TimingLimits
	Signal   SignalLimits
	Bext     BextLimits

	// LimitSources maps a check ID (e.g. "integrated", "true_peak") to where
	// that limit comes from, with its marker: [doc] read in the document,
	// [desc] read in a neutral description, [memory] recalled, not yet read
	// in the document, or "common practice, no published source".
	LimitSources map[string]string
	// Notes are caveats Describe prints, e.g. parts of the document kweigh
	// does not check.
	Notes []string
}

// Source identifies a published document.
type Source struct {
	Document string // e.g. "EBU R 128"
	Version  string // e.g. "4.0"; empty when not known
	Year     int    // 0 when not known
	// Marker says how the values were obtained: "doc", "desc", "memory",
	// "common practice" or "user spec".
	Marker string
}

// String writes the source as "EBU R 128 v4.0 (2020)".
func (s Source) String() string {
	var b strings.Builder
	b.WriteString(s.Document)
	if s.Version != "" {
		fmt.Fprintf(&b, " v%s", s.Version)
	}
	if s.Year != 0 {
		fmt.Fprintf(&b, " (%d)", s.Year)
	}
	return b.String()
}

// LoudnessLimits are the loudness requirements. The integrated requirement
// is either a target with a symmetric tolerance or a window of minimum and
// maximum (either bound may be open), never both.
type LoudnessLimits struct {
	TargetLUFS  *float64 // integrated target
	ToleranceLU float64  // ± around TargetLUFS
	// MonoTargetLUFS replaces TargetLUFS for one-channel files (podcast
	// practice: -16 LUFS stereo, -19 LUFS mono); needs TargetLUFS.
	MonoTargetLUFS *float64
	// MonoOffsetLU, when set, says the mono target is defined relative to
	// the stereo one (podcast practice: 3 LU below): a user spec that
	// extends this one and moves TargetLUFS without setting a mono target
	// moves the mono target with it.
	MonoOffsetLU      *float64
	MinIntegratedLUFS *float64 // window, lower bound
	MaxIntegratedLUFS *float64 // window, upper bound
	// WarnMarginLU turns a pass into a warning when the integrated loudness
	// is inside the tolerance (or window) but less than this far from its
	// edge. It applies to integrated loudness only: maxima such as the true
	// peak have no tolerance, and files limited exactly to the ceiling are
	// normal practice.
	WarnMarginLU float64

	MaxTruePeakDBTP  *float64
	MaxShortTermLUFS *float64 // highest 3 s window (EBU Tech 3341 S)
	MaxMomentaryLUFS *float64 // highest 400 ms window (EBU Tech 3341 M)

	MinLRALU *float64 // loudness range (EBU Tech 3342)
	MaxLRALU *float64
	// LRAAdvisory makes the LRA limits recommendations: outside them the
	// file warns instead of failing.
	LRAAdvisory bool

	// CheckDownmix judges the integrated loudness of a surround file's
	// stereo fold-down (measure.Downmix) against the same target as the
	// file itself.
	CheckDownmix bool
}

// FormatLimits restrict the file format; an empty list allows anything.
type FormatLimits struct {
	Containers    []string // wav, rf64, bw64, flac, mp3, aiff, aifc
	SampleRatesHz []int
	BitDepths     []int
	SampleFormats []string // int, float
	Channels      []int
	// Layouts lists accepted channel layouts, each as channel labels in
	// stream order (package decode's vocabulary, e.g. [L R]).
	Layouts [][]string
	// MinBitRateKbps and MaxBitRateKbps bound the average coded bit rate of
	// compressed files (kbit/s); uncompressed files are not judged.
	MinBitRateKbps *float64
	MaxBitRateKbps *float64
	// BitRateModes lists the accepted ways a compressed file spends its
	// bits: "cbr", "vbr", "abr".
	BitRateModes []string
}

// TimingLimits restrict duration and silence at the ends, in seconds.
type TimingLimits struct {
	MinDurationS        *float64
	MaxDurationS        *float64
	MaxLeadingSilenceS  *float64
	MaxTrailingSilenceS *float64
}

// Policy says what a finding without a numeric limit leads to.
type Policy string

// Policies for findings such as dual mono or silent channels.
const (
	PolicyFail  Policy = "fail"  // the finding fails the file
	PolicyWarn  Policy = "warn"  // the finding warns (kweigh's default)
	PolicyAllow Policy = "allow" // the finding is not checked
)

// SignalLimits are signal-hygiene requirements. A nil limit means the spec
// says nothing: kweigh then applies its QC default threshold (the QCDefault
// constants) and a finding only warns. A limit the spec sets fails the file.
type SignalLimits struct {
	// MaxClipRuns is the number of runs of consecutive full-scale samples
	// allowed (0: none).
	MaxClipRuns *int64
	// MaxDCOffsetDBFS limits every channel's mean sample value, in dBFS.
	MaxDCOffsetDBFS *float64
	// MinCorrelation limits the whole-file correlation of the front L/R
	// pair; MinWindowCorrelation the lowest over 3 s windows. Strongly
	// negative correlation means the mono fold-down loses level.
	MinCorrelation       *float64
	MinWindowCorrelation *float64
	// DualMono is the policy for a two-channel file carrying the same signal
	// twice; SilentChannels for channels (other than LFE) that hold silence.
	// Empty means PolicyWarn.
	DualMono       Policy
	SilentChannels Policy
}

// QC defaults applied when a spec sets no limit; findings against them only
// warn. They are kweigh's own choices (common practice, no published source).
const (
	QCDefaultMaxClipRuns          = 0     // any run of full-scale samples
	QCDefaultMaxDCOffsetDBFS      = -40.0 // 1 % of full scale
	QCDefaultMinCorrelation       = -0.3
	QCDefaultMinWindowCorrelation = -0.5
)

// BextLimits say how far the loudness metadata a BWF file declares in its
// bext chunk (EBU Tech 3285 v2) may stray from the measurement.
type BextLimits struct {
	// Required makes a missing bext loudness value a failure.
	Required bool
	// LoudnessToleranceLU, TruePeakToleranceDB and LRAToleranceLU are the
	// largest accepted differences between declared and measured integrated
	// loudness, maximum true peak and loudness range.
	LoudnessToleranceLU float64
	TruePeakToleranceDB float64
	LRAToleranceLU      float64
	// Mismatch is the verdict for a difference beyond tolerance; empty means
	// PolicyWarn.
	Mismatch Policy
}

// Default bext tolerances (kweigh's choices, common practice, no published
// source): two meters that each meet EBU Tech 3341/3342 may differ by
// ±0.2 LU in I, by up to 0.6 dB in true peak (+0.2/-0.4 dB each) and by
// ±2 LU in LRA (±1 LU each) [memory].
const (
	DefaultBextLoudnessToleranceLU = 0.5
	DefaultBextTruePeakToleranceDB = 1.0
	DefaultBextLRAToleranceLU      = 2.0
)

// DefaultWarnMarginLU is the integrated-loudness warning margin specs get
// unless they set their own (kweigh's choice, common practice, no published
// source).
const DefaultWarnMarginLU = 0.2

// newSpec returns an empty spec with kweigh's defaults: no loudness, format
// or timing limits, QC-default signal hygiene, default bext tolerances.
func newSpec() *Spec {
	return &Spec{
		Loudness: LoudnessLimits{WarnMarginLU: DefaultWarnMarginLU},
		Bext: BextLimits{
			LoudnessToleranceLU: DefaultBextLoudnessToleranceLU,
			TruePeakToleranceDB: DefaultBextTruePeakToleranceDB,
			LRAToleranceLU:      DefaultBextLRAToleranceLU,
		},
		LimitSources: map[string]string{},
	}
}

// Clone returns a deep copy of s, so that a caller may change it without
// touching the original.
func (s *Spec) Clone() *Spec {
	c := *s
	c.Format.Containers = append([]string(nil), s.Format.Containers...)
	c.Format.SampleRatesHz = append([]int(nil), s.Format.SampleRatesHz...)
	c.Format.BitDepths = append([]int(nil), s.Format.BitDepths...)
	c.Format.SampleFormats = append([]string(nil), s.Format.SampleFormats...)
	c.Format.Channels = append([]int(nil), s.Format.Channels...)
	c.Format.BitRateModes = append([]string(nil), s.Format.BitRateModes...)
	c.Format.MinBitRateKbps = clonePtr(s.Format.MinBitRateKbps)
	c.Format.MaxBitRateKbps = clonePtr(s.Format.MaxBitRateKbps)
	c.Format.Layouts = nil
	for _, l := range s.Format.Layouts {
		c.Format.Layouts = append(c.Format.Layouts, append([]string(nil), l...))
	}
	c.LimitSources = make(map[string]string, len(s.LimitSources))
	for k, v := range s.LimitSources {
		c.LimitSources[k] = v
	}
	c.Notes = append([]string(nil), s.Notes...)
	// Pointer limits are never written through, only replaced, so sharing
	// them is safe; copy them anyway so the clone is fully independent.
	c.Loudness.TargetLUFS = clonePtr(s.Loudness.TargetLUFS)
	c.Loudness.MonoTargetLUFS = clonePtr(s.Loudness.MonoTargetLUFS)
	c.Loudness.MonoOffsetLU = clonePtr(s.Loudness.MonoOffsetLU)
	c.Loudness.MinIntegratedLUFS = clonePtr(s.Loudness.MinIntegratedLUFS)
	c.Loudness.MaxIntegratedLUFS = clonePtr(s.Loudness.MaxIntegratedLUFS)
	c.Loudness.MaxTruePeakDBTP = clonePtr(s.Loudness.MaxTruePeakDBTP)
	c.Loudness.MaxShortTermLUFS = clonePtr(s.Loudness.MaxShortTermLUFS)
	c.Loudness.MaxMomentaryLUFS = clonePtr(s.Loudness.MaxMomentaryLUFS)
	c.Loudness.MinLRALU = clonePtr(s.Loudness.MinLRALU)
	c.Loudness.MaxLRALU = clonePtr(s.Loudness.MaxLRALU)
	c.Timing.MinDurationS = clonePtr(s.Timing.MinDurationS)
	c.Timing.MaxDurationS = clonePtr(s.Timing.MaxDurationS)
	c.Timing.MaxLeadingSilenceS = clonePtr(s.Timing.MaxLeadingSilenceS)
	c.Timing.MaxTrailingSilenceS = clonePtr(s.Timing.MaxTrailingSilenceS)
	c.Signal.MaxClipRuns = clonePtr(s.Signal.MaxClipRuns)
	c.Signal.MaxDCOffsetDBFS = clonePtr(s.Signal.MaxDCOffsetDBFS)
	c.Signal.MinCorrelation = clonePtr(s.Signal.MinCorrelation)
	c.Signal.MinWindowCorrelation = clonePtr(s.Signal.MinWindowCorrelation)
	return &c
}

func clonePtr[T any](p *T) *T {
	if p == nil {
		return nil
	}
	v := *p
	return &v
}

// ptr returns a pointer to v.
func ptr[T any](v T) *T { return &v }

// integratedWindow returns the accepted integrated-loudness range for a file
// with the given channel count, the loudness it should aim at and whether
// the spec has an integrated requirement at all. lo or hi is nil when that
// side is open.
func (s *Spec) integratedWindow(channels int) (lo, hi *float64, aim float64, ok bool) {
	l := s.Loudness
	if t := s.targetFor(channels); t != nil {
		return ptr(*t - l.ToleranceLU), ptr(*t + l.ToleranceLU), *t, true
	}
	switch {
	case l.MinIntegratedLUFS != nil && l.MaxIntegratedLUFS != nil:
		return l.MinIntegratedLUFS, l.MaxIntegratedLUFS, (*l.MinIntegratedLUFS + *l.MaxIntegratedLUFS) / 2, true
	case l.MinIntegratedLUFS != nil:
		return l.MinIntegratedLUFS, nil, *l.MinIntegratedLUFS, true
	case l.MaxIntegratedLUFS != nil:
		return nil, l.MaxIntegratedLUFS, *l.MaxIntegratedLUFS, true
	}
	return nil, nil, 0, false
}

// Unit returns the spec's loudness unit, "LUFS" or "LKFS".
func (s *Spec) Unit() string {
	if s.LoudnessUnit == "" {
		return "LUFS"
	}
	return s.LoudnessUnit
}

// targetFor returns the integrated target for a file with the given channel
// count: the mono target for one channel when the spec has one.
func (s *Spec) targetFor(channels int) *float64 {
	if channels == 1 && s.Loudness.MonoTargetLUFS != nil {
		return s.Loudness.MonoTargetLUFS
	}
	return s.Loudness.TargetLUFS
}

// policyOrWarn returns p, or PolicyWarn when p is empty.
func policyOrWarn(p Policy) Policy {
	if p == "" {
		return PolicyWarn
	}
	return p
}

// Integrated writes the integrated-loudness requirement for stereo and
// multichannel files, e.g. "-23.0 LUFS ±1.0 LU"; empty when there is none.
func (s *Spec) Integrated() string { return s.integratedLimit(2) }
