package htmlpage

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"

	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/rules"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// render writes page and fails the test on error.
func render(t testing.TB, page Page) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := Write(&b, page); err != nil {
		t.Fatalf("Write: %v", err)
	}
	return b.Bytes()
}

// TestGolden compares the demo reports byte for byte with the files in
// testdata (go test -run TestGolden -update rewrites them).
func TestGolden(t *testing.T) {
	for _, tc := range []struct {
		name string
		page func(testing.TB) Page
	}{
		{"check", demoPage},
		{"measure", measurePage},
		{"demo", demoSetPage},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := render(t, tc.page(t))
			golden := filepath.Join("testdata", tc.name+".html.golden")
			if *update {
				if err := os.WriteFile(golden, got, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(golden)
			if err != nil {
				t.Fatalf("%v (run with -update to create it)", err)
			}
			if !bytes.Equal(got, want) {
				gl, wl := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
				for i := 0; i < min(len(gl), len(wl)); i++ {
					if gl[i] != wl[i] {
						t.Fatalf("%s differs at line %d:\ngot:  %.300s\nwant: %.300s\n(run with -update if the change is intended)", golden, i+1, gl[i], wl[i])
					}
				}
				t.Fatalf("%s differs in length: got %d lines, want %d", golden, len(gl), len(wl))
			}
		})
	}
}

// parseHTML parses a report with the HTML5 parser.
func parseHTML(t testing.TB, doc []byte) *html.Node {
	t.Helper()
	root, err := html.Parse(bytes.NewReader(doc))
	if err != nil {
		t.Fatalf("report is not parsable HTML: %v", err)
	}
	return root
}

// findAll returns every element below n for which match is true.
func findAll(n *html.Node, match func(*html.Node) bool) []*html.Node {
	var out []*html.Node
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode && match(n) {
			out = append(out, n)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(n)
	return out
}

func attr(n *html.Node, key string) (string, bool) {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val, true
		}
	}
	return "", false
}

func hasClass(n *html.Node, class string) bool {
	v, _ := attr(n, "class")
	for _, c := range strings.Fields(v) {
		if c == class {
			return true
		}
	}
	return false
}

func textOf(n *html.Node) string {
	var b strings.Builder
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(n)
	return strings.Join(strings.Fields(b.String()), " ")
}

// jsonRecord is a Result as kweigh's JSON output carries it, decoded back
// into generic values: the report's numbers must match these.
func jsonRecord(t testing.TB, r *rules.Result) map[string]any {
	t.Helper()
	raw, err := json.Marshal(r)
	if err != nil {
		t.Fatalf("%s: %v", r.Path, err)
	}
	var rec map[string]any
	if err := json.Unmarshal(raw, &rec); err != nil {
		t.Fatal(err)
	}
	return rec
}

// jsonFixed prints a JSON number the way the report must, written here
// independently of package reports: decimals digits (one for loudness, two
// for peaks: issue 2), a JSON null as "n/a" (kweigh's word for an undefined
// figure).
func jsonFixed(v any, decimals int) string {
	f, ok := v.(float64)
	if !ok {
		return "n/a"
	}
	s := fmt.Sprintf("%.*f", decimals, f)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// TestReportContent parses the synthetic demo report and checks that
// every file appears, in order, with the numbers of its JSON record.
func TestReportContent(t *testing.T) {
	checkReportContent(t, demoPage(t))
}

// checkReportContent renders page and checks that every entry appears in
// the summary and in its own section, in order, showing the numbers of its
// JSON record (json.Marshal of the Result) rounded for display.
func checkReportContent(t *testing.T, page Page) {
	t.Helper()
	root := parseHTML(t, render(t, page))

	tables := findAll(root, func(n *html.Node) bool { v, _ := attr(n, "id"); return n.DataAtom == atom.Table && v == "summary" })
	if len(tables) != 1 {
		t.Fatalf("found %d summary tables, want 1", len(tables))
	}
	rows := findAll(tables[0], func(n *html.Node) bool { _, ok := attr(n, "data-file"); return n.DataAtom == atom.Tr && ok })
	if len(rows) != len(page.Entries) {
		t.Fatalf("summary has %d rows, want one per file (%d)", len(rows), len(page.Entries))
	}
	for i, e := range page.Entries {
		r := e.Result
		rec := jsonRecord(t, r)
		row := rows[i]
		if got, _ := attr(row, "data-file"); got != r.Path {
			t.Errorf("summary row %d is %q, want %q", i+1, got, r.Path)
		}
		cell := func(class string) string {
			cells := findAll(row, func(n *html.Node) bool { return hasClass(n, class) })
			if len(cells) != 1 {
				t.Fatalf("%s: %d %q cells", r.Path, len(cells), class)
			}
			return textOf(cells[0])
		}
		for _, c := range []struct {
			class, key string
			decimals   int
		}{
			{"integrated", "integrated_lufs", 1},
			{"lra", "loudness_range_lu", 1},
			{"true-peak", "true_peak_dbtp", 2},
		} {
			if got, want := cell(c.class), jsonFixed(rec[c.key], c.decimals); got != want {
				t.Errorf("%s: summary %s shows %q, JSON %s is %v (want %q)", r.Path, c.class, got, c.key, rec[c.key], want)
			}
		}
		if got, want := cell("reason"), MainReason(r); got != want {
			t.Errorf("%s: main reason %q, want %q", r.Path, got, want)
		}
		verdict := verdictOf(r.Verdict)
		if got := textOf(row); !strings.Contains(got, verdict.Symbol+" "+verdict.Word) {
			t.Errorf("%s: summary row %q lacks the verdict in symbol and word (%s %s)", r.Path, got, verdict.Symbol, verdict.Word)
		}

		// The file's own section.
		anchor := fmt.Sprintf("file-%d", i+1)
		sections := findAll(root, func(n *html.Node) bool { v, _ := attr(n, "id"); return n.DataAtom == atom.Section && v == anchor })
		if len(sections) != 1 {
			t.Fatalf("%s: %d sections with id %s", r.Path, len(sections), anchor)
		}
		sec := sections[0]
		if h := findAll(sec, func(n *html.Node) bool { return n.DataAtom == atom.H2 }); len(h) == 0 || !strings.Contains(textOf(h[0]), r.Path) {
			t.Errorf("%s: section heading does not name the file", r.Path)
		}
		if r.Error != "" {
			if !strings.Contains(textOf(sec), r.Error) {
				t.Errorf("%s: the error %q is not shown", r.Path, r.Error)
			}
			continue
		}
		figures := map[string]string{}
		for _, d := range findAll(sec, func(n *html.Node) bool {
			return n.DataAtom == atom.Div && n.Parent != nil && hasClass(n.Parent, "figures")
		}) {
			dt := findAll(d, func(n *html.Node) bool { return n.DataAtom == atom.Dt })
			v := findAll(d, func(n *html.Node) bool { return hasClass(n, "value") })
			figures[textOf(dt[0])] = textOf(v[0])
		}
		signal := rec["signal"].(map[string]any)
		for _, c := range []struct {
			label    string
			json     any
			decimals int
		}{
			{"Integrated", rec["integrated_lufs"], 1},
			{"Loudness range", rec["loudness_range_lu"], 1},
			{"True peak", rec["true_peak_dbtp"], 2},
			{"Sample peak", rec["sample_peak_dbfs"], 2},
			{"Max momentary", rec["max_momentary_lufs"], 1},
			{"Max short-term", rec["max_short_term_lufs"], 1},
			{"Leading silence", signal["leading_silence_s"], 1},
			{"Trailing silence", signal["trailing_silence_s"], 1},
		} {
			if got, want := figures[c.label], jsonFixed(c.json, c.decimals); got != want {
				t.Errorf("%s: %s shows %q, JSON has %v (want %q)", r.Path, c.label, got, c.json, want)
			}
		}
		measured := findAll(sec, func(n *html.Node) bool { return n.DataAtom == atom.Td && hasClass(n, "measured") })
		checks, _ := rec["checks"].([]any)
		if len(measured) != len(checks) {
			t.Fatalf("%s: %d checks shown, JSON has %d", r.Path, len(measured), len(checks))
		}
		for j, c := range checks {
			c := c.(map[string]any)
			unit, _ := c["unit"].(string)
			var want string
			switch m := c["measured"].(type) {
			case string:
				want = m
			default:
				want = jsonFixed(m, reports.UnitDecimals(unit))
			}
			if want != "n/a" && unit != "" {
				want += " " + unit
			}
			if got := textOf(measured[j]); got != want {
				t.Errorf("%s: check %v shows %q, JSON measured %v (want %q)", r.Path, c["id"], got, c["measured"], want)
			}
		}
		if g := findAll(sec, func(n *html.Node) bool { return hasClass(n, "gain") }); rec["suggested_gain_db"] != nil {
			want := jsonFixed(rec["suggested_gain_db"], 1)
			if !strings.HasPrefix(want, "-") && want != "0.0" {
				want = "+" + want // a boost is shown with its sign
			}
			want += " dB"
			if len(g) != 1 || textOf(g[0]) != want {
				t.Errorf("%s: suggested gain not shown as %q", r.Path, want)
			}
		} else if len(g) != 0 {
			t.Errorf("%s: a gain is shown though JSON has none", r.Path)
		}
		if svgs := findAll(sec, func(n *html.Node) bool { return n.DataAtom == atom.Svg }); len(svgs) != 3 {
			t.Errorf("%s: %d SVG figures, want 3 (plot, histogram, peaks)", r.Path, len(svgs))
		}
	}
}

// TestSVGIsXML re-serialises every inline SVG of the demo reports and
// parses it as XML.
func TestSVGIsXML(t *testing.T) {
	for _, page := range []Page{demoPage(t), measurePage(t), demoSetPage(t)} {
		root := parseHTML(t, render(t, page))
		svgs := findAll(root, func(n *html.Node) bool { return n.DataAtom == atom.Svg })
		if len(svgs) == 0 {
			t.Fatal("no SVG in the report")
		}
		for i, n := range svgs {
			var b bytes.Buffer
			if err := html.Render(&b, n); err != nil {
				t.Fatal(err)
			}
			checkSVGXML(t, fmt.Sprintf("%s svg %d", page.Title, i+1), b.Bytes())
		}
	}
}

// checkSVGXML parses doc as XML (strictly) and checks that the root is an
// SVG element in the SVG namespace with a title.
func checkSVGXML(t *testing.T, what string, doc []byte) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(doc))
	depth, titles := 0, 0
	var root xml.Name
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v\n%.400s", what, err, doc)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			if depth == 0 {
				root = el.Name
			}
			if el.Name.Local == "title" {
				titles++
			}
			depth++
		case xml.EndElement:
			depth--
		}
	}
	if root.Space != "http://www.w3.org/2000/svg" || root.Local != "svg" {
		t.Errorf("%s: root element is %v, want svg in the SVG namespace", what, root)
	}
	if titles == 0 {
		t.Errorf("%s: no <title> (text alternative)", what)
	}
}

// TestSelfContained checks that the report loads nothing from elsewhere.
func TestSelfContained(t *testing.T) {
	root := parseHTML(t, render(t, demoPage(t)))
	for _, n := range findAll(root, func(*html.Node) bool { return true }) {
		switch n.DataAtom {
		case atom.Link, atom.Img, atom.Iframe, atom.Object, atom.Embed, atom.Audio, atom.Video, atom.Source:
			t.Errorf("report has a <%s> element", n.Data)
		}
		for _, a := range n.Attr {
			switch {
			case a.Key == "xmlns":
				// the SVG namespace name, not a resource
			case a.Key == "src", a.Key == "srcset", a.Key == "action":
				t.Errorf("<%s %s=%q> loads a resource", n.Data, a.Key, a.Val)
			case a.Key == "href" || a.Key == "xlink:href":
				if !strings.HasPrefix(a.Val, "#") {
					t.Errorf("<%s href=%q> points outside the page", n.Data, a.Val)
				}
			case strings.Contains(a.Val, "url(") && !strings.Contains(a.Val, "url(#"):
				t.Errorf("<%s %s=%q> refers to an outside resource", n.Data, a.Key, a.Val)
			}
		}
		if n.DataAtom == atom.Style || n.DataAtom == atom.Script {
			body := textOf(n)
			for _, bad := range []string{"@import", "url(", "http:", "https:", "fetch(", "XMLHttpRequest"} {
				if strings.Contains(body, bad) {
					t.Errorf("<%s> contains %q", n.Data, bad)
				}
			}
		}
	}
	// Element ids must be unique, or the SVG patterns of one file would
	// paint another's plot.
	seen := map[string]bool{}
	for _, n := range findAll(root, func(n *html.Node) bool { _, ok := attr(n, "id"); return ok }) {
		id, _ := attr(n, "id")
		if seen[id] {
			t.Errorf("id %q appears twice", id)
		}
		seen[id] = true
	}
}

// TestPrintStyles checks the print rules the issue asks for are present.
func TestPrintStyles(t *testing.T) {
	for _, want := range []string{"@media print", "@page", "break-before: page", "break-inside: avoid"} {
		if !strings.Contains(pageCSS, want) {
			t.Errorf("page CSS lacks %q", want)
		}
	}
}

// TestWritePlotSVG checks the standalone plot: an XML declaration, the SVG
// namespace, well-formed XML.
func TestWritePlotSVG(t *testing.T) {
	for _, e := range demoPage(t).Entries {
		if e.Result.Error != "" {
			continue
		}
		var b bytes.Buffer
		if err := WritePlotSVG(&b, e); err != nil {
			t.Fatal(err)
		}
		if !bytes.HasPrefix(b.Bytes(), []byte(`<?xml version="1.0" encoding="UTF-8"?>`)) {
			t.Errorf("%s: standalone SVG lacks the XML declaration", e.Result.Path)
		}
		checkSVGXML(t, e.Result.Path, b.Bytes())
	}
}

// failingWriter fails every write.
type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func TestWriteErrors(t *testing.T) {
	page := demoPage(t)
	page.Entries = append(page.Entries, Entry{})
	err := Write(io.Discard, page)
	if !errors.Is(err, ErrNoResult) || !strings.Contains(err.Error(), fmt.Sprintf("entry %d", len(page.Entries))) {
		t.Errorf("Write with an empty entry: got %v, want ErrNoResult naming entry %d", err, len(page.Entries))
	}
	if err := WritePlotSVG(io.Discard, Entry{Result: &rules.Result{}}); !errors.Is(err, ErrNoResult) {
		t.Errorf("WritePlotSVG without a measurement: got %v, want ErrNoResult", err)
	}
	if err := Write(failingWriter{}, demoPage(t)); err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Errorf("Write to a failing writer: got %v, want the writer's error", err)
	}
	if err := WritePlotSVG(failingWriter{}, demoPage(t).Entries[0]); err == nil || !strings.Contains(err.Error(), "almanac/ep101_mix.wav") {
		t.Errorf("WritePlotSVG to a failing writer: got %v, want an error naming the file", err)
	}
}
