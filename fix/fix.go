package fix

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/engine"
	"github.com/kweigh/kweigh/loudness/limiter"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

// Defaults the command line starts from.
const (
	// DefaultMaxLimitingDB is the deepest peak reduction fix applies
	// without being told more is acceptable (kweigh's choice: beyond about
	// 6 dB a programme's transients are audibly flattened; common
	// practice, no published source).
	DefaultMaxLimitingDB = 6.0
	// DefaultMarginDB is how far under the ceiling the limiter aims.
	DefaultMarginDB = limiter.DefaultMarginDB
	// NoCeilingDBTP is the ceiling used when a spec sets none: 0 dBTP, so
	// that a gain never clips an integer output.
	NoCeilingDBTP = 0.0
	// OnAimLU is how close integrated loudness must come to the aim before
	// the passes stop (the issue asks for 0.1 LU; the passes aim for less,
	// so that dither and rounding cannot push a result over it).
	OnAimLU = 0.03
	// MaxPasses bounds the candidate corrections measured per file.
	MaxPasses = 5
	// MP3MarginDB is the extra margin under the ceiling for an MP3
	// re-encode: lame 3.100 at 64–128 kb/s put the true peak of limited
	// programme up to 0.33 dB above the PCM it was given (0.77 dB above
	// that PCM scaled by lame's own 0.95) in TestMP3PeakOvershoot; 0.8 dB
	// leaves room for programme that overshoots more. After an encode that
	// still misses, the margin grows by the measured excess and the encode
	// is repeated.
	MP3MarginDB = 0.8
)

// Options tune File.
type Options struct {
	// Spec is the delivery spec to bring files to (required).
	Spec *rules.Spec
	// OutDir is the folder outputs go to, keeping their names; empty:
	// NAME.fixed.EXT beside the input.
	OutDir string
	// InPlace replaces the input itself (atomically) instead.
	InPlace bool
	// Force allows an existing output to be replaced.
	Force bool
	// Always corrects files that already pass (to the exact aim).
	Always bool
	// MaxLimitingDB is the deepest limiting accepted; a file that needs
	// more is refused.
	MaxLimitingDB float64
	// NoLimiter applies gain only; a file whose gain would cross the
	// ceiling is refused.
	NoLimiter bool
	// MarginDB is the limiter's margin under the ceiling.
	MarginDB float64
	// DryRun plans and writes nothing.
	DryRun bool
	// Measure is passed to every measurement (layout, decoder options).
	Measure measure.Options
	// Lame is the MP3 encoder to run: empty looks "lame" up on PATH,
	// "none" means there is none.
	Lame string
}

// kind is the writer a container needs.
type kind int

const (
	kindWAV kind = iota
	kindAIFF
	kindFLAC
	kindMP3
)

func kindOf(container string) (kind, bool) {
	switch container {
	case "wav", "rf64", "bw64":
		return kindWAV, true
	case "aiff", "aifc":
		return kindAIFF, true
	case "flac":
		return kindFLAC, true
	case "mp3":
		return kindMP3, true
	}
	return 0, false
}

// File corrects the file at path per o and returns the record. It never
// returns nil; a file it cannot handle gets Action Failed with Err set.
func File(ctx context.Context, path string, o Options) *Record {
	rec := &Record{Path: path, Notes: []string{}}
	if o.Spec == nil {
		return Unjudged(path, errors.New("no delivery spec to bring the file to"))
	}
	// The input is judged by the engine every front end uses.
	j := engine.Judge(ctx, path, engine.Options{Spec: o.Spec, Measure: o.Measure})
	m, before := j.Measurement, *j.Result
	rec.Before = &before
	if m.Error != "" {
		return rec.fail(m.Err, m.Error)
	}
	if m.Damaged != "" {
		return rec.refuse("the audio is damaged (%s): deliver it again; kweigh does not correct damaged files", m.Damaged)
	}
	k, ok := kindOf(m.Format)
	if !ok {
		return rec.fail(errors.New("no writer"), fmt.Sprintf("%s: kweigh cannot write %s files", path, m.Format))
	}
	if !needsFix(&before) && !o.Always {
		rec.Action = NoneNeeded
		rec.After = rec.Before
		rec.Reason = "integrated loudness and true peak already meet the spec; the file was left alone"
		if ids := failing(&before); len(ids) > 0 {
			rec.Reason += "; it fails checks fix does not correct: " + strings.Join(ids, ", ")
		}
		return rec
	}
	if !wholeFileGroups(&before, m.Channels) {
		return rec.refuse("its spec judges it in %d programme groups, and kweigh fix corrects a file as a whole (one gain, one limiter); correct each programme on its own and deliver the file again", len(before.Groups))
	}
	p, refusal := plan(m, o, k)
	if refusal != "" {
		return rec.refuse("%s", refusal)
	}
	lame := ""
	if k == kindMP3 {
		lame = findLame(o.Lame)
	}
	dest, err := destination(path, o, k, lame != "")
	if err != nil {
		return rec.fail(err, err.Error())
	}
	rec.GainDB = ptr(p.gain)
	if p.limit {
		rec.LimitingDB = ptr(p.limiting)
	}
	rec.Action = p.action()
	if o.DryRun {
		rec.Reason = "dry run, nothing written: " + p.describe(dest)
		if k == kindMP3 && lame == "" {
			rec.Notes = append(rec.Notes, "lame is not on PATH: a WAV would be written, to be encoded to MP3 by you")
		}
		return rec
	}
	w := &work{rec: rec, o: o, m: m, k: k, p: p, path: path, dest: dest, lame: lame}
	return w.run(ctx)
}

// failing lists the ids of r's failing checks.
func failing(r *rules.Result) []string {
	var ids []string
	for _, c := range judged(r) {
		if c.Verdict == rules.Fail || c.Verdict == rules.Error {
			ids = append(ids, c.ID)
		}
	}
	return ids
}

// judged returns every check of r: the file's and, when its spec judges it
// in programme groups, those of each judged group (where the loudness and
// true-peak checks then are).
func judged(r *rules.Result) []rules.Check {
	out := append([]rules.Check(nil), r.Checks...)
	for _, g := range r.Groups {
		if !g.MeasureOnly {
			out = append(out, g.Checks...)
		}
	}
	return out
}

// wholeFileGroups reports whether r's groups (if any) let one correction of
// the whole file serve: no groups, or one judged group of every channel.
func wholeFileGroups(r *rules.Result, channels int) bool {
	var judgedGroups []rules.GroupResult
	for _, g := range r.Groups {
		if !g.MeasureOnly {
			judgedGroups = append(judgedGroups, g)
		}
	}
	switch len(judgedGroups) {
	case 0:
		return true
	case 1:
		return len(judgedGroups[0].Channels) == channels && len(judgedGroups[0].Streams) <= 1
	}
	return false
}

// needsFix reports whether the loudness or true-peak checks failed or
// warned.
func needsFix(r *rules.Result) bool {
	for _, c := range judged(r) {
		if (c.ID == "integrated" || c.ID == "true_peak") && c.Verdict != rules.Pass {
			return true
		}
	}
	return false
}

// Unjudged is the record of a file that could not be given a spec (none
// found, or a broken kweigh.toml): an error, nothing measured or written.
func Unjudged(path string, err error) *Record {
	r := &Record{Path: path, Notes: []string{}}
	return r.fail(err, fmt.Sprintf("%s: %v", path, err))
}

func (r *Record) fail(err error, msg string) *Record {
	r.Action, r.Err, r.Reason = Failed, err, msg
	r.GainDB, r.LimitingDB = nil, nil
	return r
}

func (r *Record) refuse(format string, a ...any) *Record {
	r.Action, r.Reason = Refused, fmt.Sprintf(format, a...)
	return r
}

// correction is the plan for one file.
type correction struct {
	aim      float64 // integrated loudness to reach (LUFS); NaN without one
	hasAim   bool
	ceiling  float64 // dBTP
	target   float64 // what the limiter aims at: ceiling − margin(s)
	gain     float64 // dB
	limit    bool
	limiting float64 // dB of peak reduction (estimated, then measured)
	passes   int
}

func (p *correction) action() Action {
	if p.limit {
		return GainAndLimiting
	}
	return Gain
}

func (p *correction) describe(dest string) string {
	s := fmt.Sprintf("apply %+.2f dB", p.gain)
	if p.hasAim {
		s += fmt.Sprintf(" to reach %.1f LUFS", p.aim)
	}
	if p.limit {
		s += fmt.Sprintf(" with about %.1f dB of true-peak limiting to stay under %.1f dBTP", p.limiting, p.ceiling)
	}
	return s + ", writing " + dest
}

// aimFor returns the integrated loudness a correction aims at: the spec's
// target (its mono target for one channel), the middle of a window, or,
// for a window open on one side, 1 LU inside its one bound (kweigh's
// choice, so that the result does not sit on the edge where a spec's warn
// margin applies).
func aimFor(s *rules.Spec, channels int) (float64, bool) {
	l := s.Loudness
	switch {
	case channels == 1 && l.MonoTargetLUFS != nil:
		return *l.MonoTargetLUFS, true
	case l.TargetLUFS != nil:
		return *l.TargetLUFS, true
	case l.MinIntegratedLUFS != nil && l.MaxIntegratedLUFS != nil:
		return (*l.MinIntegratedLUFS + *l.MaxIntegratedLUFS) / 2, true
	case l.MinIntegratedLUFS != nil:
		return *l.MinIntegratedLUFS + 1, true
	case l.MaxIntegratedLUFS != nil:
		return *l.MaxIntegratedLUFS - 1, true
	}
	return math.NaN(), false
}

// plan works out the gain and whether limiting is needed, or why the file
// is refused.
func plan(m *measure.Measurement, o Options, k kind) (*correction, string) {
	p := &correction{ceiling: NoCeilingDBTP}
	if c := o.Spec.Loudness.MaxTruePeakDBTP; c != nil {
		p.ceiling = *c
	}
	p.target = p.ceiling - o.MarginDB
	if k == kindMP3 {
		p.target -= MP3MarginDB
	}
	p.aim, p.hasAim = aimFor(o.Spec, m.Channels)
	if p.hasAim {
		if m.IntegratedLUFS == nil {
			return nil, "the file has no measurable integrated loudness (silent or shorter than 400 ms): no gain can be worked out"
		}
		p.gain = p.aim - *m.IntegratedLUFS
	}
	if m.TruePeakDBTP == nil {
		return p, "" // digital silence: nothing to limit
	}
	after := *m.TruePeakDBTP + p.gain
	if after <= p.target {
		return p, ""
	}
	p.limit, p.limiting = true, after-p.target
	goal := fmt.Sprintf("under %.1f dBTP", p.ceiling)
	if p.hasAim {
		goal = fmt.Sprintf("%.1f LUFS under %.1f dBTP", p.aim, p.ceiling)
	}
	if o.NoLimiter {
		return nil, fmt.Sprintf("a gain of %+.1f dB would put the true peak at %.1f dBTP, over the %.1f dBTP ceiling, and the limiter is off (--no-limiter): needs %.1f dB of limiting to reach %s",
			p.gain, after, p.ceiling, p.limiting, goal)
	}
	if p.limiting > o.MaxLimitingDB {
		return nil, tooDynamic(p.limiting, goal)
	}
	return p, ""
}

// tooDynamic is the refusal for a file that needs more limiting than
// allowed.
func tooDynamic(db float64, goal string) string {
	return fmt.Sprintf("needs %.1f dB of limiting to reach %s; the programme is too dynamic for this target — remix, or allow it with --max-limiting %.0f",
		db, goal, math.Ceil(db+0.5))
}

// findLame returns the lame to run, or "".
func findLame(name string) string {
	switch name {
	case "none":
		return ""
	case "":
		name = "lame"
	}
	p, err := exec.LookPath(name)
	if err != nil {
		return ""
	}
	return p
}

// destination returns where the output goes, and refuses to overwrite an
// existing file without Force (or the input itself without InPlace).
func destination(path string, o Options, k kind, haveLame bool) (string, error) {
	if o.InPlace {
		if k == kindMP3 && !haveLame {
			return "", fmt.Errorf("%s: cannot replace an MP3 in place without lame on PATH (an MP3 needs an encoder)", path)
		}
		return path, nil
	}
	ext := filepath.Ext(path)
	base := strings.TrimSuffix(filepath.Base(path), ext)
	if k == kindMP3 && !haveLame {
		ext = ".wav"
	}
	var dest string
	if o.OutDir != "" {
		dest = filepath.Join(o.OutDir, base+ext)
	} else {
		dest = filepath.Join(filepath.Dir(path), base+".fixed"+ext)
	}
	if same(dest, path) {
		return "", fmt.Errorf("%s: the output would replace the input; use the in-place option to do that on purpose", path)
	}
	if _, err := os.Lstat(dest); err == nil && !o.Force {
		return "", fmt.Errorf("%s: output %s exists (use the force option to replace it)", path, dest)
	} else if err != nil && !errors.Is(err, fs.ErrNotExist) {
		return "", fmt.Errorf("%s: output %s: %w", path, dest, err)
	}
	return dest, nil
}

// same reports whether a and b name the same file (or the same path when
// b does not exist yet).
func same(a, b string) bool {
	if filepath.Clean(a) == filepath.Clean(b) {
		return true
	}
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(sa, sb)
}

func ptr[T any](v T) *T { return &v }

// dbToLinear converts a gain in dB to a factor.
func dbToLinear(db float64) float64 { return math.Pow(10, db/20) }

// infoOf opens path and returns its stream description.
func infoOf(path string, opt decode.Options) (decode.Info, error) {
	f, err := decode.OpenWith(path, opt)
	if err != nil {
		return decode.Info{}, err
	}
	defer f.Close()
	return f.Info(), nil
}
