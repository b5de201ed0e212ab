package reports

import (
	"encoding/xml"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/rules"
)

// parsedSuites is JUnit XML read back with encoding/xml, independently of
// the writer's own types.
type parsedSuites struct {
	XMLName  xml.Name `xml:"testsuites"`
	Tests    int      `xml:"tests,attr"`
	Failures int      `xml:"failures,attr"`
	Errors   int      `xml:"errors,attr"`
	Suites   []struct {
		Name     string `xml:"name,attr"`
		Tests    int    `xml:"tests,attr"`
		Failures int    `xml:"failures,attr"`
		Errors   int    `xml:"errors,attr"`
		Cases    []struct {
			ClassName string `xml:"classname,attr"`
			Name      string `xml:"name,attr"`
			Failure   *struct {
				Message string `xml:"message,attr"`
				Type    string `xml:"type,attr"`
			} `xml:"failure"`
			Error *struct {
				Message string `xml:"message,attr"`
			} `xml:"error"`
			SystemOut string `xml:"system-out"`
		} `xml:"testcase"`
	} `xml:"testsuite"`
}

// expectedCounts counts from the results what the JUnit output must say.
func expectedCounts(rs []*rules.Result, strict bool) (tests, failures, errs int) {
	for _, r := range rs {
		if r.Error != "" && len(r.Checks) == 0 {
			tests++
			errs++
			continue
		}
		for _, c := range r.Checks {
			tests++
			switch {
			case c.Verdict == rules.Error:
				errs++
			case c.Verdict == rules.Fail, c.Verdict == rules.Warn && strict:
				failures++
			}
		}
	}
	return tests, failures, errs
}

func TestJUnitParsesWithCorrectCounts(t *testing.T) {
	for _, strict := range []bool{false, true} {
		opts := testOptions()
		opts.Strict = strict
		var doc parsedSuites
		if err := xml.Unmarshal(renderCheck(t, JUnit, opts), &doc); err != nil {
			t.Fatalf("strict=%v: output is not XML: %v", strict, err)
		}
		tests, failures, errs := expectedCounts(testResults(), strict)
		if doc.Tests != tests || doc.Failures != failures || doc.Errors != errs {
			t.Errorf("strict=%v: testsuites tests/failures/errors = %d/%d/%d, want %d/%d/%d",
				strict, doc.Tests, doc.Failures, doc.Errors, tests, failures, errs)
		}
		if len(doc.Suites) != 2 || doc.Suites[0].Name != "kweigh check: ebu-r128" || doc.Suites[1].Name != "kweigh check: podcast" {
			t.Fatalf("strict=%v: want one suite per spec (ebu-r128, podcast), got %d", strict, len(doc.Suites))
		}
		sum := 0
		for _, s := range doc.Suites {
			f, e := 0, 0
			for _, c := range s.Cases {
				if c.Failure != nil {
					f++
				}
				if c.Error != nil {
					e++
				}
				if c.ClassName == "" || c.Name == "" {
					t.Errorf("test case without classname or name: %+v", c)
				}
			}
			if s.Tests != len(s.Cases) || s.Failures != f || s.Errors != e {
				t.Errorf("strict=%v: suite %s says %d/%d/%d, holds %d/%d/%d", strict, s.Name, s.Tests, s.Failures, s.Errors, len(s.Cases), f, e)
			}
			sum += s.Tests
		}
		if sum != doc.Tests {
			t.Errorf("suites hold %d tests, testsuites says %d", sum, doc.Tests)
		}
	}
}

func TestJUnitCases(t *testing.T) {
	var doc parsedSuites
	if err := xml.Unmarshal(renderCheck(t, JUnit, testOptions()), &doc); err != nil {
		t.Fatal(err)
	}
	type key struct{ class, name string }
	cases := map[key]int{}
	for si, s := range doc.Suites {
		for ci, c := range s.Cases {
			cases[key{c.ClassName, c.Name}] = si*1000 + ci
		}
	}
	get := func(class, name string) int {
		i, ok := cases[key{class, name}]
		if !ok {
			t.Fatalf("no test case %s / %s", class, name)
		}
		return i
	}
	at := func(i int) (s, c int) { return i / 1000, i % 1000 }

	s, c := at(get("deliveries/hollow-orchard/HO_S02E02_final_51.wav", "true_peak"))
	tc := doc.Suites[s].Cases[c]
	if tc.Failure == nil || tc.Failure.Type != "fail" || !strings.Contains(tc.Failure.Message, "-0.38 dBTP") {
		t.Errorf("true-peak failure = %+v, want a failure naming the measured -0.38 dBTP", tc.Failure)
	}
	s, c = at(get("deliveries/hollow-orchard/HO_S02E03_final.wav", "trailing_silence"))
	tc = doc.Suites[s].Cases[c]
	if tc.Failure != nil || !strings.HasPrefix(tc.SystemOut, "WARN") {
		t.Errorf("warning = %+v, want a passing case with WARN in system-out", tc)
	}
	s, c = at(get("deliveries/hollow-orchard/HO_S02E04_final.wav", "measure"))
	tc = doc.Suites[s].Cases[c]
	if tc.Error == nil || !strings.Contains(tc.Error.Message, "fmt chunk") {
		t.Errorf("corrupt file = %+v, want an error carrying the decoder's message", tc)
	}
	if s, _ = at(get("deliveries/podcast/HO_S02_trailer_mono.wav", "integrated")); doc.Suites[s].Name != "kweigh check: podcast" {
		t.Errorf("podcast file in suite %q", doc.Suites[s].Name)
	}
}
