package rules

import (
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"
)

// qcDefaultSource is where kweigh's own QC defaults come from.
const qcDefaultSource = "kweigh QC default, warn only (common practice, no published source)"

// limitRow is one line of a spec description.
type limitRow struct{ check, limit, source string }

// Summary returns a one-line description of the spec's main limits and its
// source, for `kweigh specs`, e.g.
// "-23.0 LUFS ±1.0 LU, true peak ≤ -1.0 dBTP; EBU R 128 v4.0 (2020)".
func (s *Spec) Summary() string {
	return strings.Join(s.summaryParts(), ", ") + "; " + s.Source.String()
}

// summaryParts lists the main limits in words, from the effective values.
func (s *Spec) summaryParts() []string {
	var parts []string
	u := s.Unit()
	if lim := s.integratedLimit(2); lim != "" {
		if s.Loudness.MonoTargetLUFS != nil {
			lim += fmt.Sprintf(" (mono %s %s)", limitNum(*s.Loudness.MonoTargetLUFS), u)
		}
		parts = append(parts, lim)
	}
	if v := s.Loudness.MaxTruePeakDBTP; v != nil {
		parts = append(parts, fmt.Sprintf("true peak ≤ %s dBTP", limitNum(*v)))
	}
	if v := s.Loudness.MaxShortTermLUFS; v != nil {
		parts = append(parts, fmt.Sprintf("short-term ≤ %s %s", limitNum(*v), u))
	}
	if v := s.Loudness.MaxMomentaryLUFS; v != nil {
		parts = append(parts, fmt.Sprintf("momentary ≤ %s %s", limitNum(*v), u))
	}
	if len(parts) == 0 {
		parts = append(parts, "no loudness limits")
	}
	return parts
}

// EffectiveDescription is the spec's own description, or for a spec that
// has none (a user spec, which never inherits its base's wording), one
// generated from the effective limits: what `specs show` prints.
func (s *Spec) EffectiveDescription() string {
	if s.Description != "" {
		return s.Description
	}
	return "Loudness limits: " + strings.Join(s.summaryParts(), ", ") + "."
}

// Describe writes the spec in words for `kweigh specs show`: its title,
// source and every limit with where it comes from, then its notes.
func (s *Spec) Describe(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: %s\n", s.ID, s.Title)
	fmt.Fprintf(&b, "%s\n", s.EffectiveDescription())
	fmt.Fprintf(&b, "Source: %s", s.Source)
	if s.Source.Marker != "" {
		fmt.Fprintf(&b, " [%s]", s.Source.Marker)
	}
	b.WriteString("\n")
	if s.File != "" {
		fmt.Fprintf(&b, "File: %s\n", s.File)
	}
	b.WriteString("\n")
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "CHECK\tLIMIT")
	for _, r := range s.limitRows() {
		fmt.Fprintf(tw, "%s\t%s\n\t  source: %s\n", r.check, r.limit, r.source)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	b.WriteString("\nNotes:\n")
	for _, n := range s.Notes {
		fmt.Fprintf(&b, "- %s\n", n)
	}
	b.WriteString("- Values are compared with their limits after rounding both to 0.01.\n")
	b.WriteString("- A pass is not a legal or broadcaster certification: local regulation and the receiving party's own QC decide.\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// sourceOf returns where the limit of a check comes from.
func (s *Spec) sourceOf(check string) string {
	if src, ok := s.LimitSources[check]; ok {
		return src
	}
	return s.Source.String()
}

// limitRows lists every limit the spec sets, and the QC defaults it leaves
// in place, in check order.
func (s *Spec) limitRows() []limitRow {
	var rows []limitRow
	add := func(check, limit, source string) { rows = append(rows, limitRow{check, limit, source}) }
	l := s.Loudness
	if lim := s.integratedLimit(2); lim != "" {
		add("integrated", lim, s.sourceOf("integrated"))
		if l.MonoTargetLUFS != nil {
			add("integrated (mono files)", s.integratedLimit(1), s.sourceOf("integrated"))
		}
		margin := "none"
		if l.WarnMarginLU > 0 {
			margin = fmt.Sprintf("warn within %s LU of the edge", magnitude(l.WarnMarginLU))
		}
		src, ok := s.LimitSources["warn_margin"]
		if !ok {
			src = "kweigh default (common practice, no published source)"
		}
		add("integrated near edge", margin, src)
	}
	if v := l.MaxTruePeakDBTP; v != nil {
		add("true_peak", fmt.Sprintf("≤ %s dBTP", limitNum(*v)), s.sourceOf("true_peak"))
	}
	if v := l.MaxShortTermLUFS; v != nil {
		add("max_short_term", fmt.Sprintf("≤ %s %s", limitNum(*v), s.Unit()), s.sourceOf("max_short_term"))
	}
	if v := l.MaxMomentaryLUFS; v != nil {
		add("max_momentary", fmt.Sprintf("≤ %s %s", limitNum(*v), s.Unit()), s.sourceOf("max_momentary"))
	}
	if l.MinLRALU != nil || l.MaxLRALU != nil {
		lim := rangeLimit(l.MinLRALU, l.MaxLRALU, "LU")
		if l.LRAAdvisory {
			lim += " (recommended: warn only)"
		}
		add("loudness_range", lim, s.sourceOf("loudness_range"))
	}
	if l.CheckDownmix {
		add("downmix_integrated", "surround files: the Lo/Ro fold-down within the integrated limit too", s.sourceOf("downmix_integrated"))
		if l.MaxTruePeakDBTP != nil {
			add("downmix_true_peak", "surround files: the Lo/Ro fold-down's true peak under the ceiling too", s.sourceOf("downmix_integrated"))
		}
	}
	f := s.Format
	if len(f.Containers) > 0 {
		add("container", "one of "+strings.Join(f.Containers, ", "), s.sourceOf("container"))
	}
	if len(f.SampleRatesHz) > 0 {
		add("sample_rate", "one of "+joinInts(f.SampleRatesHz)+" Hz", s.sourceOf("sample_rate"))
	}
	if len(f.BitDepths) > 0 {
		add("bit_depth", "one of "+joinInts(f.BitDepths)+" bits", s.sourceOf("bit_depth"))
	}
	if f.MinBitRateKbps != nil || f.MaxBitRateKbps != nil {
		add("bit_rate", "compressed files: "+rangeLimit(f.MinBitRateKbps, f.MaxBitRateKbps, "kbps"), s.sourceOf("bit_rate"))
	}
	if len(f.BitRateModes) > 0 {
		add("bit_rate_mode", "compressed files: one of "+strings.Join(f.BitRateModes, ", "), s.sourceOf("bit_rate_mode"))
	}
	if len(f.SampleFormats) > 0 {
		add("sample_format", "one of "+strings.Join(f.SampleFormats, ", "), s.sourceOf("sample_format"))
	}
	if len(f.Channels) > 0 {
		add("channels", "one of "+joinInts(f.Channels)+" channels", s.sourceOf("channels"))
	}
	if len(f.Layouts) > 0 {
		names := make([]string, len(f.Layouts))
		for i, lay := range f.Layouts {
			names[i] = strings.Join(lay, ",")
		}
		add("channel_layout", "one of "+strings.Join(names, " | "), s.sourceOf("channel_layout"))
	}
	t := s.Timing
	if t.MinDurationS != nil || t.MaxDurationS != nil {
		add("duration", rangeLimit(t.MinDurationS, t.MaxDurationS, "s"), s.sourceOf("duration"))
	}
	if v := t.MaxLeadingSilenceS; v != nil {
		add("leading_silence", fmt.Sprintf("≤ %s s", magnitude(*v)), s.sourceOf("leading_silence"))
	}
	if v := t.MaxTrailingSilenceS; v != nil {
		add("trailing_silence", fmt.Sprintf("≤ %s s", magnitude(*v)), s.sourceOf("trailing_silence"))
	}
	sig := s.Signal
	if sig.MaxClipRuns != nil {
		add("clipping", fmt.Sprintf("≤ %d runs of consecutive full-scale samples", *sig.MaxClipRuns), s.sourceOf("clipping"))
	} else {
		add("clipping", "no runs of consecutive full-scale samples", qcDefaultSource)
	}
	add(signalRow("dc_offset", sig.MaxDCOffsetDBFS, QCDefaultMaxDCOffsetDBFS, func(v float64) string { return fmt.Sprintf("≤ %s dBFS", limitNum(v)) }, s))
	add(signalRow("phase", sig.MinCorrelation, QCDefaultMinCorrelation, func(v float64) string { return fmt.Sprintf("whole-file L/R correlation ≥ %s", num(v, 2)) }, s))
	add(signalRow("phase_window", sig.MinWindowCorrelation, QCDefaultMinWindowCorrelation, func(v float64) string { return fmt.Sprintf("3 s window L/R correlation ≥ %s", num(v, 2)) }, s))
	add(policyRow("dual_mono", "two-channel file must not carry the same signal twice", sig.DualMono, s))
	add(policyRow("silent_channels", "no silent channel (LFE excepted)", sig.SilentChannels, s))
	bx := s.Bext
	if bx.Mismatch != PolicyAllow || bx.Required {
		lim := fmt.Sprintf("declared within ±%s LU (I, max M, max S), ±%s dB (true peak), ±%s LU (LRA) of measured; mismatch: %s",
			magnitude(bx.LoudnessToleranceLU), magnitude(bx.TruePeakToleranceDB), magnitude(bx.LRAToleranceLU), policyOrWarn(bx.Mismatch))
		if bx.Required {
			lim = "required; " + lim
		}
		src, ok := s.LimitSources["bext_loudness"]
		if !ok {
			src = qcDefaultSource
		}
		add("bext_loudness", lim, src)
	}
	return rows
}

func signalRow(check string, limit *float64, qcDefault float64, text func(float64) string, s *Spec) (string, string, string) {
	if limit != nil {
		return check, text(*limit), s.sourceOf(check)
	}
	return check, text(qcDefault), qcDefaultSource
}

func policyRow(check, what string, p Policy, s *Spec) (string, string, string) {
	if p == "" {
		return check, what, qcDefaultSource
	}
	if p == PolicyAllow {
		return check, "not checked", s.sourceOf(check)
	}
	return check, what + " (" + string(p) + ")", s.sourceOf(check)
}

func joinInts(v []int) string {
	s := make([]string, len(v))
	for i, n := range v {
		s[i] = strconv.Itoa(n)
	}
	return strings.Join(s, ", ")
}
