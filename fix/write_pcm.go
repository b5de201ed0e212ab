package fix

import (
	"bufio"
	"fmt"
	"io"
	"os"
)

// writePCM writes the corrected WAV or AIFF file: the input's bytes up to
// its first audio frame, the chain's samples coded as the input codes them,
// and the input's bytes after the last frame, so every chunk other than the
// audio is kept byte for byte and the file has the input's size. in is the
// input file; the layout says where its audio is.
func writePCM(w io.Writer, in io.ReaderAt, size int64, l *pcmLayout, c *chain) (frames int64, err error) {
	bw := bufio.NewWriterSize(w, 1<<16)
	if _, err := io.Copy(bw, io.NewSectionReader(in, 0, l.dataOffset)); err != nil {
		return 0, fmt.Errorf("copying the header: %w", err)
	}
	ch := c.info.Channels
	coder := sampleCoder{l: l}
	if !l.float {
		// The chain has already dithered and quantized to this word
		// length; the coder only turns the exact codes into bytes.
		coder.q = newQuantizer(l.validBits)
		coder.q.noDither = true
	}
	maxFrames := l.dataSize / int64(l.blockAlign)
	buf := make([]float64, chainFrames*ch)
	raw := make([]byte, chainFrames*l.blockAlign)
	for {
		n, err := c.ReadFrames(buf)
		if n > 0 {
			if frames+int64(n) > maxFrames {
				return frames, fmt.Errorf("the decoder delivered more frames than the audio chunk holds (%d)", maxFrames)
			}
			if clipped := coder.encode(raw, buf[:n*ch]); clipped > 0 {
				return frames, fmt.Errorf("internal: %d samples outside the word after quantisation", clipped)
			}
			if _, err := bw.Write(raw[:n*l.blockAlign]); err != nil {
				return frames, err
			}
			frames += int64(n)
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			return frames, err
		}
	}
	rest := l.dataOffset + frames*int64(l.blockAlign)
	if _, err := io.Copy(bw, io.NewSectionReader(in, rest, size-rest)); err != nil {
		return frames, fmt.Errorf("copying the chunks after the audio: %w", err)
	}
	return frames, bw.Flush()
}

// openInput opens the input for the writer's byte copies.
func openInput(path string) (*os.File, int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, err
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, 0, err
	}
	return f, st.Size(), nil
}
