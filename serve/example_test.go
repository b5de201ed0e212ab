package serve_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"log/slog"
	"math"
	"net"
	"net/http"

	"github.com/kweigh/kweigh/rules"
	"github.com/kweigh/kweigh/serve"
)

// sineWAV is a 48 kHz stereo 16-bit WAV of a 997 Hz sine at the given peak
// level in both channels, a quarter period apart.
func sineWAV(seconds, dBFS float64) []byte {
	frames := int(seconds * 48000)
	a := math.Pow(10, dBFS/20) * 32767
	var b bytes.Buffer
	le := func(v any) { binary.Write(&b, binary.LittleEndian, v) }
	b.WriteString("RIFF")
	le(uint32(36 + 4*frames))
	b.WriteString("WAVEfmt ")
	le([]uint32{16})
	le([]uint16{1, 2})
	le([]uint32{48000, 48000 * 4})
	le([]uint16{4, 16})
	b.WriteString("data")
	le(uint32(4 * frames))
	for i := range frames {
		ph := 2 * math.Pi * 997 * float64(i) / 48000
		le([]int16{int16(math.Round(a * math.Sin(ph))), int16(math.Round(a * math.Cos(ph)))})
	}
	return b.Bytes()
}

// Example runs the upload gate on a loopback port and judges one upload:
// a sine at -23 dBFS in each channel reads -23.0 LUFS (EBU Tech 3341
// case 1), on target for EBU R 128.
func Example() {
	def, _ := rules.Lookup("ebu-r128")
	cat, _ := serve.NewCatalogue(def)
	srv, err := serve.New(serve.Config{Catalogue: cat, Jobs: 1, Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		fmt.Println(err)
		return
	}
	ln, _ := net.Listen("tcp", "127.0.0.1:0")
	ctx, stop := context.WithCancel(context.Background())
	defer stop()
	done := make(chan error)
	go func() { done <- srv.Serve(ctx, ln) }()

	resp, err := http.Post("http://"+ln.Addr().String()+"/v1/checks?name=tidewater-ep7.wav", "audio/wav", bytes.NewReader(sineWAV(3, -23)))
	if err != nil {
		fmt.Println(err)
		return
	}
	resp.Body.Close()
	fmt.Println(resp.StatusCode, resp.Header.Get(serve.HeaderVerdict))

	stop()
	fmt.Println(<-done)
	// Output:
	// 200 pass
	// <nil>
}

// ExampleParseSize reads --max-upload values: SI units are powers of
// 1000, binary ones powers of 1024.
func ExampleParseSize() {
	for _, s := range []string{"500MB", "50MiB", "8GiB"} {
		n, _ := serve.ParseSize(s)
		fmt.Println(s, n)
	}
	// Output:
	// 500MB 500000000
	// 50MiB 52428800
	// 8GiB 8589934592
}
