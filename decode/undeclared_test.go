package decode_test

import (
	"bytes"
	"encoding/binary"
	"fmt"

	"github.com/kweigh/kweigh/decode"
)

// ExampleForeignAfter walks what follows a WAV's audio: a LIST chunk and an
// appended ID3v2 tag belong there; the bytes after them do not.
func ExampleForeignAfter() {
	var b bytes.Buffer
	b.WriteString("LIST")
	binary.Write(&b, binary.LittleEndian, uint32(4))
	b.WriteString("INFO")
	b.WriteString("ID3\x04\x00\x00\x00\x00\x00\x0a") // a 10-byte tag body follows
	b.Write(make([]byte, 10))
	b.Write([]byte{0x81, 0x7F, 0x02, 0xFE, 0x11, 0x90, 0x00, 0xC3}) // samples
	r := bytes.NewReader(b.Bytes())
	fmt.Println(decode.ForeignAfter(r, 0, r.Size(), binary.LittleEndian), "of", r.Size())
	fmt.Println(decode.ForeignAfter(r, 0, r.Size()-8, binary.LittleEndian), "of", r.Size()-8)
	// Output:
	// 32 of 40
	// 32 of 32
}
