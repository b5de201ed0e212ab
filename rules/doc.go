// Package rules judges a measured file against a delivery spec: what a
// receiving party (broadcaster, streaming service, podcast host) requires of
// loudness (ITU-R BS.1770 integrated loudness, true peak, EBU Tech 3341
// short-term and momentary maxima, EBU Tech 3342 loudness range), of the file
// format, of its timing and of signal hygiene.
//
// A Spec holds the limits; the built-in specs (Builtin, Lookup) follow the
// published delivery recommendations — EBU R 128, ATSC A/85, ARIB TR-B32,
// Free TV Australia OP-59, AES TD1004 and TD1008 — plus podcast common
// practice, each carrying its source. User specs are TOML files (Parse,
// LoadFile) that may extend a built-in spec and override any limit.
//
// Evaluate turns a measure.Measurement into a Result: one Check per judged
// requirement, each with a verdict (pass, warn, fail, error), the measured
// value, the limit and a one-line reason, plus the gain that would bring the
// file to its target and whether a true-peak limiter would then be needed.
//
// Number rules, used throughout:
//   - Values are compared with their limits after rounding both to 0.01 (the
//     resolution of the BWF bext loudness fields): a value that rounds onto
//     the edge of a tolerance passes, 0.01 beyond it does not.
//   - Loudness and durations are written with one decimal; a value within
//     0.1 of its limit that has a hundredths digit is written with two, so
//     that -21.96 LUFS is not shown as the -22.0 edge it fails. True peaks
//     are written with two decimals, as every report writes them.
//     Check.Measured carries loudness and peak values unrounded, others
//     rounded to 0.01.
//   - One number in every sentence: a reason's deviation is its printed
//     value minus the printed limit; the suggested gain starts from the
//     same printed value, and the limiter reduction from the printed true
//     peak plus that gain. Gains and reductions are exact to 0.01 dB
//     (written with one decimal when the second is 0), the resolution of
//     every comparison, so following the advice is enough without rounding
//     anything up.
//   - The integrated warning margin (Spec.Loudness.WarnMarginLU, default
//     0.2 LU) turns a pass within that distance of the tolerance edge into a
//     warning; exactly on the edge is therefore a warning, not a failure.
//   - Machine-facing text (Check.Limit, Spec summaries) and reasons use the
//     ASCII hyphen-minus for negative numbers, so that "-23.0" can be
//     searched for; ±, ≤ and ≥ are written as such.
//
// A pass is not a legal or broadcaster certification: local regulation and
// the receiving party's own QC decide.
package rules
