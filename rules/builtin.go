package rules

import (
	"fmt"
	"strings"
)

// builtinSpecs builds the built-in specs in their listing order. Every value
// is the one in the project's standards sheet (SOURCES.md §4), with its
// marker in LimitSources: [doc] read in the document, [desc] read in a
// neutral description, [memory] recalled, not yet read in the document.
var builtinSpecs = []func() *Spec{
	ebuR128, ebuR128QC, ebuR128S1, atscA85, aribTRB32, op59, aesTD1004, aesTD1008, podcast,
}

func ebuR128() *Spec {
	s := newSpec()
	s.ID = "ebu-r128"
	s.Title = "EBU R 128, production tolerance"
	s.Description = "Loudness normalisation of broadcast programmes to -23 LUFS with the ±1.0 LU tolerance for production."
	s.Source = Source{Document: "EBU R 128", Version: "4.0", Year: 2020, Marker: "doc"}
	s.Loudness.TargetLUFS = ptr(-23.0)
	s.Loudness.ToleranceLU = 1.0
	s.Loudness.MaxTruePeakDBTP = ptr(-1.0)
	s.LimitSources["integrated"] = "EBU R 128 v4.0 (2020): target -23.0 LUFS, ±1.0 LU production tolerance [doc]"
	s.LimitSources["true_peak"] = "EBU R 128 v4.0 (2020): maximum true peak -1 dBTP [desc]"
	s.Notes = append(s.Notes, "Loudness range is a descriptor in EBU R 128, not a limit: it is measured and reported, not judged.")
	return s
}

func ebuR128QC() *Spec {
	s := ebuR128()
	s.ID = "ebu-r128-qc"
	s.Title = "EBU R 128, QC measurement tolerance"
	s.Description = "EBU R 128 judged with the ±0.2 LU tolerance for quality-control measurement of a finished file."
	s.Loudness.ToleranceLU = 0.2
	// The ±0.2 LU QC tolerance is itself the allowance for measurement
	// spread, so no near-edge warning is added (kweigh's choice).
	s.Loudness.WarnMarginLU = 0
	s.LimitSources["integrated"] = "EBU R 128 v4.0 (2020): target -23.0 LUFS, ±0.2 LU tolerance for QC measurement [doc]"
	s.LimitSources["warn_margin"] = "none: the ±0.2 LU QC tolerance already allows for measurement spread (kweigh's choice)"
	return s
}

func ebuR128S1() *Spec {
	s := newSpec()
	s.ID = "ebu-r128-s1"
	s.Title = "EBU R 128 s1, short-form content (advertisements, promos, trailers)"
	s.Description = "Short-form content at -23 LUFS whose loudest 3 s window stays at or below -18 LUFS."
	s.Source = Source{Document: "EBU R 128 s1", Year: 2016, Marker: "desc"}
	s.Loudness.TargetLUFS = ptr(-23.0)
	s.Loudness.ToleranceLU = 0.5
	s.Loudness.MaxTruePeakDBTP = ptr(-1.0)
	s.Loudness.MaxShortTermLUFS = ptr(-18.0)
	s.LimitSources["integrated"] = "EBU R 128 s1 (2016): target -23.0 LUFS [desc], tolerance ±0.5 LU [memory]"
	s.LimitSources["true_peak"] = "EBU R 128 s1 (2016): maximum true peak -1 dBTP [desc]"
	s.LimitSources["max_short_term"] = "EBU R 128 s1 (2016): maximum short-term loudness -18 LUFS [desc]"
	return s
}

func atscA85() *Spec {
	s := newSpec()
	s.LoudnessUnit = "LKFS" // the unit the document writes
	s.ID = "atsc-a85"
	s.Title = "ATSC A/85:2013, US digital television"
	s.Description = "Television programmes and commercials at -24 LKFS ±2 dB (LKFS and LUFS are the same unit)."
	s.Source = Source{Document: "ATSC A/85", Year: 2013, Marker: "desc"}
	s.Loudness.TargetLUFS = ptr(-24.0)
	s.Loudness.ToleranceLU = 2.0
	s.Loudness.MaxTruePeakDBTP = ptr(-2.0)
	s.LimitSources["integrated"] = "ATSC A/85:2013: target -24 LKFS, tolerance ±2 dB [desc]"
	s.LimitSources["true_peak"] = "ATSC A/85:2013: maximum true peak -2 dBTP [memory]"
	s.Loudness.CheckDownmix = true
	s.LimitSources["downmix_integrated"] = "ATSC A/85:2013: surround programmes also checked on their stereo downmix [desc]; fold-down per ITU-R BS.775 [memory]"
	return s
}

func aribTRB32() *Spec {
	s := newSpec()
	s.LoudnessUnit = "LKFS" // the unit the document writes
	s.ID = "arib-tr-b32"
	s.Title = "ARIB TR-B32, Japanese television"
	s.Description = "Television programmes at -24 LKFS ±1 dB, LFE excluded from the measurement."
	s.Source = Source{Document: "ARIB TR-B32", Marker: "desc"}
	s.Loudness.TargetLUFS = ptr(-24.0)
	s.Loudness.ToleranceLU = 1.0
	s.Loudness.MaxTruePeakDBTP = ptr(-1.0)
	s.LimitSources["integrated"] = "ARIB TR-B32: target -24 LKFS, tolerance ±1 dB [desc]"
	s.LimitSources["true_peak"] = "ARIB TR-B32: maximum true peak -1 dBTP [memory]"
	s.Notes = append(s.Notes, "The LFE channel is excluded from loudness, as in every BS.1770 measurement kweigh makes.")
	return s
}

func op59() *Spec {
	s := newSpec()
	s.LoudnessUnit = "LKFS" // the unit the document writes
	s.ID = "op-59"
	s.Title = "Free TV Australia OP-59, Australian commercial television"
	s.Description = "Programmes and advertisements at the same target, -24 LKFS."
	s.Source = Source{Document: "Free TV Australia Operational Practice OP-59", Marker: "desc"}
	s.Loudness.TargetLUFS = ptr(-24.0)
	s.Loudness.ToleranceLU = 1.0
	s.Loudness.MaxTruePeakDBTP = ptr(-2.0)
	s.LimitSources["integrated"] = "Free TV Australia OP-59: target -24 LKFS [desc], tolerance ±1 LU [memory]"
	s.LimitSources["true_peak"] = "Free TV Australia OP-59: maximum true peak -2 dBTP [memory]"
	s.Notes = append(s.Notes, "OP-59 applies the same target to advertisements.")
	return s
}

func aesTD1004() *Spec {
	s := newSpec()
	s.ID = "aes-td1004"
	s.Title = "AES TD1004, streaming and network file playback"
	s.Description = "Streamed audio between -20 and -16 LUFS; a gain fix aims at the middle of that window, -18 LUFS."
	s.Source = Source{Document: "AES TD1004", Year: 2015, Marker: "desc"}
	s.Loudness.MinIntegratedLUFS = ptr(-20.0)
	s.Loudness.MaxIntegratedLUFS = ptr(-16.0)
	s.Loudness.MaxTruePeakDBTP = ptr(-1.0)
	s.LimitSources["integrated"] = "AES TD1004 (2015): -20 to -16 LUFS [desc]"
	s.LimitSources["true_peak"] = "AES TD1004 (2015): maximum true peak -1 dBTP [memory]"
	return s
}

func aesTD1008() *Spec {
	s := newSpec()
	s.ID = "aes-td1008"
	s.Title = "AES TD1008, streaming and on-demand distribution"
	s.Description = "Speech-led content at -18 LUFS ±2 LU; the upper edge, -16 LUFS, is also the ceiling for music."
	s.Source = Source{Document: "AES TD1008", Year: 2021, Marker: "desc"}
	s.Loudness.TargetLUFS = ptr(-18.0)
	s.Loudness.ToleranceLU = 2.0
	s.Loudness.MaxTruePeakDBTP = ptr(-1.0)
	s.LimitSources["integrated"] = "AES TD1008 (2021): speech -18 LUFS, ±2 LU for mixed content [desc]"
	s.LimitSources["true_peak"] = "AES TD1008 (2021): maximum true peak -1 dBTP [memory]"
	s.Notes = append(s.Notes, "TD1008 gives speech -18 LUFS and music at most -16 LUFS; kweigh models this as -18 LUFS ±2 LU, whose upper edge is the music ceiling. For a music-only outlet, extend this spec with max_integrated_lufs = -16.")
	return s
}

func podcast() *Spec {
	s := newSpec()
	s.ID = "podcast"
	s.Title = "Podcast common practice"
	s.Description = "Podcast episodes at -16 LUFS for stereo files and -19 LUFS for mono files, ±1 LU."
	s.Source = Source{Document: "podcast practice", Marker: "common practice"}
	s.Loudness.TargetLUFS = ptr(-16.0)
	s.Loudness.MonoTargetLUFS = ptr(-19.0)
	s.Loudness.MonoOffsetLU = ptr(-3.0) // mono is "3 LU below stereo" in practice
	s.Loudness.ToleranceLU = 1.0
	s.Loudness.MaxTruePeakDBTP = ptr(-1.0)
	s.LimitSources["integrated"] = "podcast practice: -16 LUFS stereo, -19 LUFS mono, ±1 LU (common practice, no published source)"
	s.LimitSources["true_peak"] = "podcast practice: maximum true peak -1 dBTP (common practice, no published source)"
	s.Notes = append(s.Notes, "There is no published podcast standard; hosts and platforms set their own rules.")
	return s
}

// Builtin returns fresh copies of the built-in specs in a stable order:
// ebu-r128, ebu-r128-qc, ebu-r128-s1, atsc-a85, arib-tr-b32, op-59,
// aes-td1004, aes-td1008, podcast.
func Builtin() []*Spec {
	specs := make([]*Spec, len(builtinSpecs))
	for i, build := range builtinSpecs {
		specs[i] = build()
	}
	return specs
}

// BuiltinIDs returns the IDs of the built-in specs in listing order.
func BuiltinIDs() []string {
	ids := make([]string, len(builtinSpecs))
	for i, build := range builtinSpecs {
		ids[i] = build().ID
	}
	return ids
}

// UnknownSpecError is returned by Lookup for an ID that names no built-in
// spec.
type UnknownSpecError struct {
	ID    string
	Known []string
}

func (e *UnknownSpecError) Error() string {
	return fmt.Sprintf("unknown spec %q (built-in specs: %s)", e.ID, strings.Join(e.Known, ", "))
}

// Lookup returns a fresh copy of the built-in spec with the given ID (case
// does not matter), or an *UnknownSpecError listing the known IDs.
func Lookup(id string) (*Spec, error) {
	want := strings.ToLower(strings.TrimSpace(id))
	for _, build := range builtinSpecs {
		if s := build(); s.ID == want {
			return s, nil
		}
	}
	return nil, &UnknownSpecError{ID: id, Known: BuiltinIDs()}
}
