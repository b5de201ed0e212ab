package wav

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// maxIXML bounds how much of an iXML chunk is read: the timecode fields sit
// near the top of real chunks (a few kilobytes); an absurd chunk is cut.
const maxIXML = 256 << 10

// maxIXMLDepth bounds element nesting; real iXML nests three or four deep.
const maxIXMLDepth = 64

// parseIXML reads TIMECODE_RATE and TIMECODE_FLAG from an iXML chunk body
// (anywhere in the document; the iXML specification puts them under
// SPEED). It returns nil, nil when the chunk holds neither, and what it
// found so far with an error when the XML is broken.
func parseIXML(body []byte) (*decode.IXML, error) {
	body = bytes.TrimRight(body, "\x00 \r\n\t")
	d := xml.NewDecoder(bytes.NewReader(body))
	d.Strict = false
	d.CharsetReader = func(_ string, r io.Reader) (io.Reader, error) { return r, nil }
	var x decode.IXML
	var field *string
	depth := 0
	var err error
	for {
		var tok xml.Token
		tok, err = d.Token()
		if err != nil {
			break
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if depth++; depth > maxIXMLDepth {
				err = errors.New("nested too deeply")
				break
			}
			switch strings.ToUpper(t.Name.Local) {
			case "TIMECODE_RATE":
				field = &x.TimecodeRate
			case "TIMECODE_FLAG":
				field = &x.TimecodeFlag
			default:
				field = nil
			}
		case xml.EndElement:
			depth--
			field = nil
		case xml.CharData:
			if field != nil && *field == "" {
				*field = strings.TrimSpace(string(t))
				if len(*field) > 32 {
					*field = (*field)[:32]
				}
			}
		}
		if depth > maxIXMLDepth {
			break
		}
	}
	var out *decode.IXML
	if x != (decode.IXML{}) {
		out = &x
	}
	switch {
	case depth > maxIXMLDepth:
		return out, errors.New("nested too deeply")
	case err == io.EOF:
		return out, nil
	}
	return out, errors.New("not well-formed XML")
}
