package reports

import (
	"encoding/xml"
	"fmt"
	"io"
	"strings"

	"github.com/kweigh/kweigh/rules"
)

// JUnit XML as CI systems read it: the <testsuites>/<testsuite>/<testcase>
// elements with their tests, failures, errors and skipped counts.
type junitSuites struct {
	XMLName   xml.Name     `xml:"testsuites"`
	Name      string       `xml:"name,attr"`
	Tests     int          `xml:"tests,attr"`
	Failures  int          `xml:"failures,attr"`
	Errors    int          `xml:"errors,attr"`
	Skipped   int          `xml:"skipped,attr"`
	Time      string       `xml:"time,attr,omitempty"`
	Timestamp string       `xml:"timestamp,attr"`
	Suites    []junitSuite `xml:"testsuite"`
}

type junitSuite struct {
	Name       string          `xml:"name,attr"`
	Tests      int             `xml:"tests,attr"`
	Failures   int             `xml:"failures,attr"`
	Errors     int             `xml:"errors,attr"`
	Skipped    int             `xml:"skipped,attr"`
	Timestamp  string          `xml:"timestamp,attr"`
	Properties []junitProperty `xml:"properties>property"`
	Cases      []junitCase     `xml:"testcase"`
}

type junitProperty struct {
	Name  string `xml:"name,attr"`
	Value string `xml:"value,attr"`
}

type junitCase struct {
	ClassName string        `xml:"classname,attr"`
	Name      string        `xml:"name,attr"`
	Failure   *junitProblem `xml:"failure,omitempty"`
	Error     *junitProblem `xml:"error,omitempty"`
	SystemOut string        `xml:"system-out,omitempty"`
}

type junitProblem struct {
	Message string `xml:"message,attr"`
	Type    string `xml:"type,attr"`
	Text    string `xml:",chardata"`
}

// junitTimestamp is the JUnit schema's timestamp form: no zone, so always UTC.
const junitTimestamp = "2006-01-02T15:04:05"

// checkJUnit collects test cases per spec and writes the XML at Close, when
// the counts the suite elements carry are known.
type checkJUnit struct {
	sink
	opts   Options
	suites []junitSuite
	specs  []string // spec id of each suite
	bySpec map[string]int
}

func newCheckJUnit(w io.Writer, opts Options) *checkJUnit {
	return &checkJUnit{sink: newSink(w, JUnit), opts: opts, bySpec: map[string]int{}}
}

func (j *checkJUnit) Write(r *rules.Result) error {
	if err := j.ready(); err != nil {
		return err
	}
	if r == nil {
		return j.fail(errNilRecord)
	}
	i, ok := j.bySpec[r.Spec]
	if !ok {
		i = len(j.suites)
		j.bySpec[r.Spec] = i
		j.suites = append(j.suites, junitSuite{Name: suiteName(r.Spec)})
		j.specs = append(j.specs, r.Spec)
	}
	suite := &j.suites[i]
	for _, c := range j.cases(r) {
		suite.Tests++
		if c.Failure != nil {
			suite.Failures++
		}
		if c.Error != nil {
			suite.Errors++
		}
		suite.Cases = append(suite.Cases, c)
	}
	return nil
}

func suiteName(spec string) string {
	if spec == "" {
		return "kweigh check"
	}
	return "kweigh check: " + spec
}

// cases turns one result into its test cases: one per check (a programme
// group's named GROUP/ID), or a single
// "measure" case in error for a file that could not be measured.
func (j *checkJUnit) cases(r *rules.Result) []junitCase {
	path := measurementPath(r.Measurement)
	if fileVerdict(r) == rules.Error && len(r.Checks) == 0 && len(r.Groups) == 0 {
		msg := "could not be checked"
		if r.Measurement == nil {
			msg += ": no measurement"
		} else if r.Measurement.Error != "" {
			msg += ": " + r.Measurement.Error
		}
		return []junitCase{{ClassName: path, Name: "measure",
			Error: &junitProblem{Message: msg, Type: string(rules.Error), Text: msg}}}
	}
	checks := namedChecks(r)
	cases := make([]junitCase, 0, len(checks))
	for _, nc := range checks {
		c := nc.Check
		jc := junitCase{ClassName: path, Name: nc.name}
		detail := checkDetail(c)
		switch {
		case c.Verdict == rules.Error:
			jc.Error = &junitProblem{Message: detail, Type: string(rules.Error), Text: problemText(nc.of, detail)}
		case c.Verdict == rules.Fail:
			jc.Failure = &junitProblem{Message: detail, Type: string(rules.Fail), Text: problemText(nc.of, detail)}
		case c.Verdict == rules.Warn && j.opts.Strict:
			jc.Failure = &junitProblem{Message: detail, Type: string(rules.Warn), Text: problemText(nc.of, detail)}
		case c.Verdict == rules.Warn:
			jc.SystemOut = "WARN: " + detail
		}
		cases = append(cases, jc)
	}
	return cases
}

// checkDetail is a check in one line: "measured …; limit …; reason".
func checkDetail(c rules.Check) string {
	return fmt.Sprintf("measured %s; limit %s; %s", Measured(c.Measured, c.Unit), c.Limit, c.Reason)
}

// problemText is the body of a failure or error: the check, then the fix.
func problemText(r *rules.Result, detail string) string {
	var b strings.Builder
	b.WriteString(detail)
	if Defined(r.SuggestedGainDB) {
		fmt.Fprintf(&b, "\nsuggested gain: %s dB", Gain(*r.SuggestedGainDB))
	}
	if Defined(r.LimiterReductionDB) {
		fmt.Fprintf(&b, "\nlimiter: %s", limiterText(*r.LimiterReductionDB, Defined(r.SuggestedGainDB)))
	}
	if r.Advice != "" {
		b.WriteString("\nadvice: " + r.Advice)
	}
	return b.String()
}

func (j *checkJUnit) Close(s Summary) error {
	if j.closed {
		return ErrClosed
	}
	if j.err == nil {
		stamp := j.opts.generated().Format(junitTimestamp)
		doc := junitSuites{Name: "kweigh check", Timestamp: stamp, Suites: j.suites}
		if s.Elapsed > 0 {
			doc.Time = Fixed(s.Elapsed.Seconds(), 3)
		}
		for i := range doc.Suites {
			suite := &doc.Suites[i]
			suite.Timestamp = stamp
			suite.Properties = []junitProperty{
				{"tool", "kweigh"}, {"version", j.opts.version()}, {"spec", j.specs[i]},
			}
			doc.Tests += suite.Tests
			doc.Failures += suite.Failures
			doc.Errors += suite.Errors
		}
		if s.Interrupted {
			// A CI system must not read a partial run as complete: one
			// error case says what is missing.
			problem := fmt.Sprintf("the run was interrupted: %s not checked", plural(s.Unfinished, "file"))
			doc.Suites = append(doc.Suites, junitSuite{Name: "kweigh run", Tests: 1, Errors: 1, Timestamp: stamp,
				Cases: []junitCase{{ClassName: "kweigh", Name: "run complete", Error: &junitProblem{Message: problem, Type: "interrupted"}}}})
			doc.Tests++
			doc.Errors++
		}
		j.print(xml.Header)
		enc := xml.NewEncoder(j.buf)
		enc.Indent("", "  ")
		j.fail(enc.Encode(doc))
		j.fail(enc.Close())
		j.print("\n")
	}
	return j.close()
}
