package measure

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"

	"github.com/kweigh/kweigh/decode"
)

// FileFacts are the delivered file's identity for the QC record: its size
// and SHA-256, so the record names exactly the bytes that were checked.
type FileFacts struct {
	SizeBytes int64  `json:"size_bytes"`
	SHA256    string `json:"sha256"`
}

// digestChunk is the read size of the digest pass: large enough that the
// pass runs at disk speed, small enough to stay bounded.
const digestChunk = 1 << 20

// Digest streams the file at path through SHA-256 (never holding more
// than one chunk) and returns its size and hash. Cancelling ctx stops it
// between chunks. Only a regular file is read.
func Digest(ctx context.Context, path string) (*FileFacts, error) {
	f, err := decode.OpenRegular(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	h := sha256.New()
	buf := make([]byte, digestChunk)
	var n int64
	for {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("%s: digest interrupted: %w", path, err)
		}
		k, err := f.Read(buf)
		h.Write(buf[:k])
		n += int64(k)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: reading for the SHA-256: %w", path, err)
		}
	}
	return &FileFacts{SizeBytes: n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}
