package htmlpage

import (
	"strings"
	"testing"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/measure"
	"github.com/kweigh/kweigh/rules"
)

func f64(v float64) *float64 { return &v }

// recordPage is a one-file QC record: an 8-channel delivery of the
// invented Tidewater Sound with two programme groups, a start timecode,
// events, file facts and bext origin fields.
func recordPage(paper string) Page {
	start := "10:00:00:00"
	m := &measure.Measurement{
		Path: "deliveries/tidewater/harbour-lights/HL_S01E04_printmaster_8ch.wav", Format: "wav", Codec: "pcm",
		SampleRateHz: 48000, Channels: 8, BitsPerSample: 24, SampleFormat: "int", DurationS: 60,
		ChannelLayout: []string{"L", "R", "C", "LFE", "Lb", "Rb", "Ls", "Rs"}, LayoutSource: "file",
		IntegratedLUFS: f64(-21), TruePeakDBTP: f64(-0.4), LoudnessRangeLU: f64(6),
		StartTimecode: &start, FPS: "25",
		File: &measure.FileFacts{SizeBytes: 138240044, SHA256: strings.Repeat("0123456789abcdef", 4)},
		Bext: &decode.Bext{Description: "Harbour Lights 104 printmaster", Originator: "Tidewater Sound", OriginatorReference: "TWS-104",
			OriginationDate: "2026-11-30", OriginationTime: "18:04:11", CodingHistory: "A=PCM,F=48000,W=24,M=multi,T=Tidewater desk B"},
		Events: []measure.Event{{Kind: measure.EventTruePeakOver, StartS: 12.3, EndS: 12.4, StartTimecode: "10:00:12:07", EndTimecode: "10:00:12:10", Value: f64(-0.4), Unit: "dBTP"}},
		Notes:  []string{},
	}
	main := &measure.GroupMeasurement{Name: "main", Channels: []int{1, 2, 3, 4, 5, 6}, Measurement: measure.Measurement{ChannelLayout: []string{"L", "R", "C", "LFE", "Ls", "Rs"}, IntegratedLUFS: f64(-23.0), TruePeakDBTP: f64(-2)}}
	stereo := &measure.GroupMeasurement{Name: "stereo", Channels: []int{7, 8}, Measurement: measure.Measurement{ChannelLayout: []string{"L", "R"}, IntegratedLUFS: f64(-19.5), TruePeakDBTP: f64(-0.4),
		Events: []measure.Event{{Kind: measure.EventLoudSection, StartS: 0, EndS: 25, StartTimecode: "10:00:00:00", EndTimecode: "10:00:25:00", Value: f64(4.5), Unit: "LU"}}}}
	m.Groups = []*measure.GroupMeasurement{main, stereo}
	r := &rules.Result{Measurement: m, Spec: "ebu-r128", Verdict: rules.Fail, Checks: []rules.Check{}, Groups: []rules.GroupResult{
		{Name: "main", Channels: main.Channels, Result: rules.Result{Measurement: &main.Measurement, Spec: "ebu-r128", Verdict: rules.Pass, Checks: []rules.Check{}}},
		{Name: "stereo", Channels: stereo.Channels, Result: rules.Result{Measurement: &stereo.Measurement, Spec: "ebu-r128", Verdict: rules.Fail,
			Checks: []rules.Check{{ID: "integrated", Verdict: rules.Fail, Reason: "integrated -19.5 LUFS is 3.5 LU above the -23.0 LUFS target"}}}},
	}}
	return Page{Title: "QC record", Generated: time.Date(2026, 12, 1, 9, 0, 0, 0, time.UTC), Specs: []string{"ebu-r128"},
		Entries: []Entry{{Result: r}}, Paper: paper,
		Record: Record{Job: "TW-2291", Client: "Harbourlight Television", Operator: "Mara Quillfeather", Notes: "Redelivery after fix of reel 2."}}
}

// TestQCRecord: the page carries the record's header, the approval
// block, the file's facts, its events with timecodes, its groups, the
// paper size, and paths that break only after separators.
func TestQCRecord(t *testing.T) {
	html := string(render(t, recordPage(PaperLetter)))
	for _, want := range []string{
		"<dt>Job</dt><dd>TW-2291</dd>", "<dt>Client</dt><dd>Harbourlight Television</dd>", "<dt>QC operator</dt><dd>Mara Quillfeather</dd>",
		"Redelivery after fix of reel 2.",
		`<h2 id="approval-title">Approval</h2>`, "<dt>Signature</dt>", "<dt>QC result</dt><dd><span class=\"badge fail\">",
		"138240044 bytes", "0123456789abcdef<wbr>0123456789abcdef", "Harbour Lights 104 printmaster", "Tidewater Sound TWS-104",
		"2026-11-30 18:04:11", "A=PCM,F=48000,W=24,M=multi,T=Tidewater desk B", "10:00:00:00 at 25 fps",
		`<td class="tc">10:00:12:07</td><td class="tc">10:00:12:10</td><td><strong>true-peak over</strong>: true peak up to -0.40 dBTP</td>`,
		"<strong>stereo</strong>", "7-8", "<strong>group stereo: loud section</strong>: 4.5 LU above the rest of the programme", "integrated -19.5 LUFS is 3.5 LU above the -23.0 LUFS target",
		"size: letter;", "deliveries/<wbr>tidewater/<wbr>harbour-lights/<wbr>HL_S01E04_printmaster_8ch.wav",
		`class="event true_peak_over"`, "timecode (HH:MM:SS:FF at 25 fps, from 10:00:00:00)",
	} {
		if !strings.Contains(html, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if a4 := string(render(t, recordPage(""))); !strings.Contains(a4, "size: A4;") {
		t.Error("default paper is not A4")
	}
	// Without record fields the header has no record list, but the
	// approval block prints for signing by hand.
	p := recordPage(PaperA4)
	p.Record = Record{}
	if html := string(render(t, p)); strings.Contains(html, `class="record"`) || !strings.Contains(html, "<dt>Signature</dt>") {
		t.Error("empty record: header list shown or approval block missing")
	}
}
