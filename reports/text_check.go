package reports

import (
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/kweigh/kweigh/rules"
)

// checkText writes, per file, the verdict in words and symbol, the main
// figures and what failed or warned with the fix; then a summary line.
type checkText struct {
	sink
	opts  Options
	files int
}

func newCheckText(w io.Writer, opts Options) *checkText {
	return &checkText{sink: newSink(w, Text), opts: opts}
}

// detailIndent lines the details up under the path, after "FAIL  ✗  ".
const detailIndent = "          "

// verdictCell is the verdict word padded to the longest word (ERROR), then
// its symbol: the same width for every verdict, so colour cannot upset the
// alignment.
func (t *checkText) verdictCell(v rules.Verdict) string {
	return paint(t.opts.Colour, v, fmt.Sprintf("%-5s %s", verdictWord(v), verdictSymbol(v)))
}

func (t *checkText) Write(r *rules.Result) error {
	if err := t.ready(); err != nil {
		return err
	}
	if r == nil {
		return t.fail(errNilRecord)
	}
	if t.files == 0 && t.opts.Spec != "" {
		t.printf("Checking against spec %s\n\n", t.opts.Spec)
	}
	if t.files > 0 {
		t.print("\n")
	}
	t.files++
	v := fileVerdict(r)
	head := t.verdictCell(v) + "  " + Printable(measurementPath(r.Measurement))
	if r.Spec != t.opts.Spec && r.Spec != "" {
		head += "  (spec " + r.Spec + ")"
	}
	t.print(head + "\n")
	m := r.Measurement
	switch {
	case m == nil:
		t.detail("could not be checked: no measurement")
	case m.Error != "":
		// The rules' checks for such a file only repeat the message.
		t.detail("could not be checked: " + Printable(m.Error))
	default:
		t.detail(figuresText(r))
		if m.Damaged != "" && !damageExplained(r.Checks, m.Damaged) {
			t.detail("DAMAGED: " + m.Damaged + "; the figures cover only the audio that could be decoded")
		}
		t.checks(r.Checks)
	}
	if m != nil {
		// Notes carry what the figures alone do not say (a decoder that
		// clipped, an assumed layout, an undefined figure), as measure
		// prints them.
		for _, n := range m.Notes {
			t.detail("note: " + n)
		}
	}
	t.fix(r)
	return t.flush()
}

// damageExplained reports whether a check that did not pass already quotes
// the damage.
func damageExplained(checks []rules.Check, damage string) bool {
	for _, c := range checks {
		if c.Verdict != rules.Pass && strings.Contains(c.Reason, damage) {
			return true
		}
	}
	return false
}

func (t *checkText) detail(text string) { t.print(detailIndent + text + "\n") }

// figuresText is the file's main figures in one line.
func figuresText(r *rules.Result) string {
	unit := func(s, u string) string {
		if s == NotAvailable {
			return s
		}
		return s + " " + u
	}
	return strings.Join([]string{
		"integrated " + unit(Loudness(r.IntegratedLUFS), r.Unit()),
		"range " + unit(Loudness(r.LoudnessRangeLU), "LU"),
		"true peak " + unit(Peak(r.TruePeakDBTP), "dBTP"),
		"duration " + Duration(r.DurationS),
	}, " · ")
}

// checks lists the checks that did not pass, aligned, each with its reason
// on the line below, and counts those that did.
func (t *checkText) checks(all []rules.Check) {
	var shown []rules.Check
	passed := 0
	for _, c := range all {
		if c.Verdict == rules.Pass {
			passed++
		} else {
			shown = append(shown, c)
		}
	}
	idWidth, measuredWidth := 0, 0
	for _, c := range shown {
		idWidth = max(idWidth, width(c.ID))
		measuredWidth = max(measuredWidth, width(Measured(c.Measured, c.Unit)))
	}
	for _, c := range shown {
		word := string(c.Verdict)
		verdict := paint(t.opts.Colour, c.Verdict, verdictSymbol(c.Verdict)+" "+word) + strings.Repeat(" ", max(5-width(word), 0))
		t.detail(fmt.Sprintf("%s %s  %s  limit %s", verdict,
			padRight(c.ID, idWidth), padRight(Measured(c.Measured, c.Unit), measuredWidth), c.Limit))
		if c.Reason != "" {
			t.detail(reasonIndent + Printable(c.Reason))
		}
	}
	if len(shown) > 0 && passed > 0 {
		t.detail(fmt.Sprintf("%s passed", plural(passed, "other check")))
	}
}

// reasonIndent puts a check's reason under its id.
const reasonIndent = "        "

// fix writes the suggested gain, the limiter reduction and the advice,
// each worded for the case at hand: a limiter after a gain, or alone.
func (t *checkText) fix(r *rules.Result) {
	gain := Defined(r.SuggestedGainDB)
	if gain {
		text := "gain " + Gain(*r.SuggestedGainDB) + " dB suggested"
		if *r.SuggestedGainDB > 0 {
			text += " (this raises the level: check the peaks and listen at a safe volume)"
		}
		t.detail(text)
	}
	if Defined(r.LimiterReductionDB) {
		t.detail("limiter needed: " + limiterText(*r.LimiterReductionDB, gain))
	}
	if r.Advice != "" {
		t.detail("advice: " + r.Advice)
	}
}

// limiterText words a limiter reduction: after the suggested gain when
// there is one, on the file as it is otherwise.
func limiterText(db float64, afterGain bool) string {
	if afterGain {
		return Adjustment(db) + " dB of true-peak reduction after that gain"
	}
	return Adjustment(db) + " dB of true-peak reduction, with no change of level"
}

func (t *checkText) Close(s Summary) error {
	if t.closed {
		return ErrClosed
	}
	if t.files > 0 {
		t.print("\n")
	}
	t.print(s.String() + "\n")
	t.print("A pass means the figures meet the spec as kweigh reads it; the receiving party's own QC and local regulation decide acceptance.\n")
	return t.close()
}

// width is the printed width of s, one column per rune.
func width(s string) int { return utf8.RuneCountInString(s) }

// padRight pads s with spaces to n columns.
func padRight(s string, n int) string {
	if w := width(s); w < n {
		return s + strings.Repeat(" ", n-w)
	}
	return s
}
