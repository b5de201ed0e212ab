// Package htmlpage writes kweigh's visual QC report: one self-contained HTML
// file (inline CSS, inline SVG, an optional few lines of inline script, no
// external resources) that shows, for every file of a run, its verdict, the
// loudness over time against the delivery target, a short-term loudness
// histogram with the loudness range, per-channel peaks and the judged checks.
//
// The plots draw the 10 Hz series of the ITU-R BS.1770 engine (momentary
// 400 ms and short-term 3 s loudness as defined in EBU Tech 3341, true peak
// per BS.1770 Annex 2); the histogram marks the loudness range region of
// EBU Tech 3342 (10th to 95th percentile of the gated short-term values).
// Long series are reduced to at most one minimum and one maximum per drawn
// column (see Decimate), so a single over is never hidden and a three-hour
// programme still makes a report of a few hundred kilobytes.
//
// Numbers are printed by the same functions as kweigh's text report
// (reports.Loudness, reports.Peak, reports.Gain, reports.Measured,
// reports.Duration, reports.Clock), so the two cannot drift: one decimal for
// loudness (LUFS, LU, gain) and two for peaks (dBTP, dBFS), the JSON value
// rounded; an undefined figure reads reports.NotAvailable ("n/a").
package htmlpage
