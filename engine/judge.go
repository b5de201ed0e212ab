package engine

import (
	"context"
	"errors"
	"fmt"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// Options say how to judge a file. The zero value judges each file against
// the nearest kweigh.toml with the default measurement options.
type Options struct {
	// Spec judges every file; nil means each file's folder spec (FindSpec).
	Spec *rules.Spec
	// Specs caches folder specs across the files of a batch; nil reads them
	// for every file. Ignored when Spec is set.
	Specs *Specs
	// MeasureOnly measures without judging: Record.Result stays nil and no
	// spec is looked for.
	MeasureOnly bool
	// Measure holds the measurement options, the decoder options
	// (Measure.Decode) included; they apply to this call only.
	Measure measure.Options
}

// Record is the outcome of judging one file.
type Record struct {
	// Target is the file judged (Path only, for Judge and JudgeStream).
	Target Target
	// Measurement is never nil: a file that could not be measured has its
	// Error set.
	Measurement *measure.Measurement
	// Result is the judgement; nil with MeasureOnly and for skipped files.
	Result *rules.Result
	// Spec is the spec the file was judged against; nil with MeasureOnly,
	// or when none was found (the Result then holds the error).
	Spec *rules.Spec
	// SpecFile is the kweigh.toml the spec came from; empty for a spec given
	// in Options.
	SpecFile string
	// Skipped is set for a file found by walking a folder that is not audio:
	// front ends leave it out of the results, with a note.
	Skipped bool
}

// Interrupted reports whether the file's measurement was stopped by the
// context: the record describes no complete measurement and a front end
// should not present it as a result.
func (r Record) Interrupted() bool {
	m := r.Measurement
	return m != nil && (errors.Is(m.Err, context.Canceled) || errors.Is(m.Err, context.DeadlineExceeded))
}

// Verdict is the file's verdict: the Result's, or for a measure-only record
// Error when the file could not be measured and Pass otherwise.
func (r Record) Verdict() rules.Verdict {
	if r.Result != nil {
		return r.Result.Verdict
	}
	if r.Measurement == nil || r.Measurement.Error != "" {
		return rules.Error
	}
	return rules.Pass
}

// Passed reports whether the file passed: a pass, or a warning unless
// strict.
func (r Record) Passed(strict bool) bool {
	switch r.Verdict() {
	case rules.Pass:
		return true
	case rules.Warn:
		return !strict
	}
	return false
}

// Judge measures the file at path and judges it against its spec (see
// Options). It never fails as a call: every problem, from a missing spec to
// an unreadable file, is in the Record's Result (verdict error). When ctx is
// cancelled, measuring stops between two blocks and Record.Interrupted is
// true.
func Judge(ctx context.Context, path string, opt Options) Record {
	return judge(ctx, Target{Path: path, Root: path, Explicit: true}, opt, func(mo measure.Options) *measure.Measurement {
		return measure.File(ctx, path, mo)
	})
}

// JudgeStream is Judge for an open decoder (an upload, a pipe already
// decoded elsewhere); name is the record's path and, without Options.Spec,
// where the folder spec is looked for.
func JudgeStream(ctx context.Context, name string, d decode.Decoder, opt Options) Record {
	return judge(ctx, Target{Path: name, Root: name, Explicit: true}, opt, func(mo measure.Options) *measure.Measurement {
		return measure.Stream(ctx, name, d, mo)
	})
}

// JudgeTarget is Judge for a collected target: a target that could not be
// listed carries its error, and a file found in a folder that is not audio
// is Skipped.
func JudgeTarget(ctx context.Context, t Target, opt Options) Record {
	return judge(ctx, t, opt, func(mo measure.Options) *measure.Measurement {
		if t.Err != nil {
			return &measure.Measurement{Path: t.Path, Error: fmt.Sprintf("%s: %v", t.Path, t.Err), Err: t.Err, Notes: []string{}}
		}
		return measure.File(ctx, t.Path, mo)
	})
}

func judge(ctx context.Context, t Target, opt Options, measureIt func(measure.Options) *measure.Measurement) Record {
	rec := Record{Target: t}
	if opt.MeasureOnly {
		rec.Measurement = measureIt(opt.Measure)
		rec.Skipped = skip(t, rec.Measurement)
		namedLikeAudio(t.Path, rec.Measurement)
		return rec
	}
	spec, file, specErr := opt.Spec, "", error(nil)
	if spec == nil {
		if opt.Specs != nil {
			spec, file, specErr = opt.Specs.Find(t.Path)
		} else {
			spec, file, specErr = FindSpec(t.Path)
		}
	}
	rec.Spec, rec.SpecFile = spec, file
	var none *NoSpecError
	if specErr != nil && !errors.As(specErr, &none) {
		// A broken spec file: no point measuring.
		rec.Measurement = errorMeasurement(t.Path, specErr)
		rec.Result = errorResult(rec.Measurement)
		return rec
	}
	rec.Measurement = measureIt(MeasureOptionsFor(opt.Measure, spec))
	if rec.Skipped = skip(t, rec.Measurement); rec.Skipped {
		return rec
	}
	namedLikeAudio(t.Path, rec.Measurement)
	if specErr != nil {
		// Measured (so that a non-audio file is still skipped), but
		// nothing to judge it by.
		rec.Measurement = errorMeasurement(t.Path, specErr)
		rec.Result = errorResult(rec.Measurement)
		return rec
	}
	r := Evaluate(spec, rec.Measurement)
	rec.Result = &r
	return rec
}

// MeasureOptionsFor returns o with what spec asks of the measurement: its
// event limits and programme groups (options already set win). A front end
// that measures on its own (fix, of the file it wrote) measures with these
// and judges with Evaluate, so its verdict is the one Judge gives.
func MeasureOptionsFor(o measure.Options, spec *rules.Spec) measure.Options {
	return withSpecGroups(withSpecEvents(o, spec), spec)
}

// Evaluate judges a measurement by spec as Judge does: the whole file and
// each programme group, a group's own spec named by the group resolved as
// a built-in ID or a file beside the spec file.
func Evaluate(spec *rules.Spec, m *measure.Measurement) rules.Result {
	return rules.EvaluateGroups(spec, m, groupSpecs(spec))
}

// skip reports whether a measurement is of a non-audio file found by
// walking a folder. A file whose name carries an audio extension is a
// delivery (decode.HasAudioExtension): if it cannot be read, that is its
// error, never a skip.
func skip(t Target, m *measure.Measurement) bool {
	return !t.Explicit && m.Err != nil && errors.Is(m.Err, decode.ErrUnknownFormat) && !decode.HasAudioExtension(t.Path)
}

// namedLikeAudio says in the error of an unrecognised file with an audio
// name what that most likely means.
func namedLikeAudio(path string, m *measure.Measurement) {
	if m.Err != nil && errors.Is(m.Err, decode.ErrUnknownFormat) && decode.HasAudioExtension(path) {
		m.Error += " although its name says it is: a damaged or mislabelled delivery"
	}
}

func errorMeasurement(path string, err error) *measure.Measurement {
	return &measure.Measurement{Path: path, Error: err.Error(), Err: err, Notes: []string{}}
}

// errorResult is the result for a file that could not be judged at all.
func errorResult(m *measure.Measurement) *rules.Result {
	r := rules.Evaluate(&rules.Spec{ID: "none"}, m)
	return &r
}
