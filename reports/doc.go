// Package reports writes kweigh's measurements (`kweigh measure`) and
// verdicts (`kweigh check`) for people and for machines: an aligned text
// table, JSON, JSON Lines, CSV and, for checks, JUnit XML. The figures are
// those of ITU-R BS.1770 and EBU Tech 3341/3342 (LUFS, LU, dBTP, dBFS) as
// package measure computes them; this package only formats them.
//
// # Writers
//
// A report is written through a MeasureWriter or a CheckWriter made by
// NewMeasureWriter or NewCheckWriter for one Format. Write takes one file's
// record; Close ends the report with a Summary the caller built with
// Summary.AddMeasurement or Summary.Add. Like bufio.Writer and csv.Writer, a
// writer keeps the first error it meets (from the underlying io.Writer or
// from encoding a record) and returns it from Close, so a failed write is
// never lost even when Write itself returned nil. Close does not close the
// underlying io.Writer.
//
// Records are written in the order Write receives them. JSON Lines is meant
// to be written as each file finishes (Format.Streaming reports this); for
// the other formats the caller should sort first (SortMeasurements,
// SortResults) so the output order is stable from run to run.
//
// # Formats
//
// text: for people. `measure` prints one block per file: the path, then a
// labelled line per figure with its unit (loudness with one decimal in LUFS
// or LU, peaks with two decimals in dBTP or dBFS), per-channel peaks under
// their channel labels, the signal findings (silence, clipping, DC offset,
// correlation), the BWF bext declared loudness when the file carries it, and
// the notes. A figure the standard leaves undefined reads "n/a" and a note
// says why. A file that could not be measured shows "ERROR" and the message;
// damaged audio shows "DAMAGED" and what was wrong. `check` prints, per file,
// the verdict spelled out (PASS, WARN, FAIL, ERROR) with a symbol (✓ ! ✗ ⊘),
// the path and the main figures, then each failing or warning check as an
// aligned row (symbol, verdict, check id, measured value, limit) with its
// reason on the line below, a count of the checks that passed, then the
// suggested gain (with a caution when it raises the level), the limiter
// reduction and the advice. A file that could not be measured shows the
// error instead of figures and checks. Colour (Options.Colour) is only ever an
// addition to the words. Both end with a summary line; `check` adds that a
// pass is not the receiving party's acceptance.
//
// json: one indented document,
//
//	{"tool": "kweigh", "version": ..., "generated": RFC 3339 UTC time,
//	 "spec": ... (check only), "files": [...], "summary": {...}}
//
// where each element of "files" is a measure.Measurement (for measure) or a
// rules.Result (for check: the measurement's keys followed by spec, verdict,
// checks, suggested_gain_db, limiter_reduction_db, advice). The summary is
// {"files", "measured", "errors", "audio_s", "elapsed_s"} for measure and
// {"files", "passed", "warned", "failed", "errors", "audio_s", "elapsed_s"}
// for check; elapsed_s is null when the caller gave no wall time.
//
// jsonl: one compact JSON object per line, the same objects as the elements
// of "files" above, and nothing else (no envelope, no summary line), so each
// line can be parsed on its own as soon as it is written.
//
// csv: RFC 4180 CSV (LF line ends) with a header row and one row per file;
// see MeasureColumns and CheckColumns for the columns. Loudness, gain and
// peak figures have two decimals, durations three; an undefined figure is an
// empty cell; lists (channel layout, check ids) are joined with ";", notes
// with " | ". A file that could not be measured has only its path (and, for
// check, spec and verdict) and the error filled in.
//
// junit: check only. JUnit XML for CI systems: one <testsuites> holding one
// <testsuite> per spec (in the order the specs first appear), one <testcase>
// per file and check, with classname = the file path and name = the check
// id. A failed check carries <failure type="fail" message="measured …;
// limit …; reason"> with the suggested gain and advice in its body; a check
// whose verdict is error carries <error>, and a file that could not be
// measured and has no checks becomes one test case named "measure" carrying
// <error>. A warning is a passing test
// case whose <system-out> starts with "WARN" and gives the measured value,
// limit and reason: CI systems show it without failing the build, and
// <skipped> would wrongly say the check did not run. With Options.Strict
// (the CLI's --strict) warnings are reported as <failure type="warn">
// instead. The counts (tests, failures, errors, skipped=0) on each element
// are those of the cases inside it; testsuites carries the wall time, when
// given, as time in seconds, and each suite a UTC timestamp.
//
// # Stable keys
//
// JSON keys and their order are the field order and json tags of
// measure.Measurement and rules.Result: changing those types changes the
// output, so they are the schema. Before encoding, every nil list or map is
// written as [] or {} (never null), a nil embedded measurement as its keys
// with zero values, and a non-finite number where a figure may be undefined
// (a *float64, a check's measured value) as null. A non-finite number in a
// field that cannot be null is an error naming the file and the key.
package reports
