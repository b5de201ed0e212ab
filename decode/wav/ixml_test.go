package wav_test

import (
	"slices"
	"strings"
	"testing"

	"github.com/kweigh/kweigh/decode"
)

// ixmlSample is an iXML chunk as a field recorder writes it: TIMECODE_RATE
// and TIMECODE_FLAG under SPEED (iXML specification, from memory), here
// for 29.97 drop-frame.
const ixmlSample = `<?xml version="1.0" encoding="UTF-8"?>
<BWFXML><IXML_VERSION>2.10</IXML_VERSION><PROJECT>Harbour Lights</PROJECT>
<SPEED><NOTE>Tidewater Sound stage B</NOTE><TIMECODE_RATE>30000/1001</TIMECODE_RATE><TIMECODE_FLAG>DF</TIMECODE_FLAG></SPEED>
</BWFXML>` + "\x00\x00"

// TestIXMLTimecode: the reader exposes the iXML timecode fields; a broken
// chunk is a note, never a failure of the file.
func TestIXMLTimecode(t *testing.T) {
	data, _ := stereo16(2)
	fmt16 := fmtChunk(1, 2, 48000, 16)
	d := open(t, wavFile("RIFF", fmt16, chunk("iXML", []byte(ixmlSample)), chunk("data", data)))
	if got := d.Info().IXML; got == nil || *got != (decode.IXML{TimecodeRate: "30000/1001", TimecodeFlag: "DF"}) {
		t.Errorf("IXML = %+v", got)
	}

	d = open(t, wavFile("RIFF", fmt16, chunk("iXML", []byte("<BWFXML><SPEED><TIMECODE_RATE>25/1</TIMECODE_RATE><TIMEC")), chunk("data", data)))
	if got := d.Info().IXML; got == nil || got.TimecodeRate != "25/1" {
		t.Errorf("broken chunk: IXML = %+v", got)
	}
	notes := d.(decode.Noter).Notes()
	if !slices.ContainsFunc(notes, func(n string) bool { return strings.Contains(n, "iXML chunk at byte") }) {
		t.Errorf("notes = %q, want one about the broken iXML chunk", notes)
	}

	deep := strings.Repeat("<A>", 100) + "<TIMECODE_RATE>25/1</TIMECODE_RATE>"
	d = open(t, wavFile("RIFF", fmt16, chunk("iXML", []byte(deep)), chunk("data", data)))
	if got := d.Info().IXML; got != nil {
		t.Errorf("100 levels deep: IXML = %+v", got)
	}
	if notes := d.(decode.Noter).Notes(); !slices.ContainsFunc(notes, func(n string) bool { return strings.Contains(n, "nested too deeply") }) {
		t.Errorf("notes = %q, want one about the nesting", notes)
	}
	d = open(t, wavFile("RIFF", fmt16, chunk("iXML", []byte("<BWFXML><PROJECT>x</PROJECT></BWFXML>")), chunk("data", data)))
	if got := d.Info().IXML; got != nil {
		t.Errorf("no timecode fields: IXML = %+v", got)
	}
}
