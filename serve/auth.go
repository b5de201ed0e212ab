package serve

import (
	"bufio"
	"crypto/sha256"
	"crypto/subtle"
	"errors"
	"fmt"
	"net"
	"net/http"
	"strings"

	"github.com/kweigh/kweigh/decode"
)

// Tokens are the bearer tokens a server accepts. Only their SHA-256 digests
// are kept, so every comparison is of two 32-byte values in constant time
// whatever the length of the token presented.
type Tokens struct {
	digests [][sha256.Size]byte
}

// maxTokenFile caps a token file: a few thousand tokens at most, never a
// device or a runaway file read into memory.
const maxTokenFile = 1 << 20

// LoadTokens reads a token file: one token per line; blank lines and lines
// starting with # are ignored, surrounding space is trimmed. A file with no
// token is an error, since it would lock every client out. Only regular
// files are read.
func LoadTokens(path string) (*Tokens, error) {
	f, err := decode.OpenRegular(path)
	if err != nil {
		return nil, fmt.Errorf("token file: %w", err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("token file %s: %w", path, err)
	}
	if st.Size() > maxTokenFile {
		return nil, fmt.Errorf("token file %s: %d bytes, more than the %d a token file may hold", path, st.Size(), maxTokenFile)
	}
	t := &Tokens{}
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 0, 4096), maxTokenFile)
	line := 0
	for sc.Scan() {
		line++
		tok := strings.TrimSpace(sc.Text())
		if tok == "" || strings.HasPrefix(tok, "#") {
			continue
		}
		if strings.ContainsAny(tok, " \t") {
			return nil, fmt.Errorf("token file %s:%d: a token may not contain spaces", path, line)
		}
		t.digests = append(t.digests, sha256.Sum256([]byte(tok)))
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("token file %s: %w", path, err)
	}
	if len(t.digests) == 0 {
		return nil, fmt.Errorf("token file %s: no token in it (one per line)", path)
	}
	return t, nil
}

// NewTokens returns the token set holding the given tokens (for tests and
// embedding programs).
func NewTokens(tokens ...string) *Tokens {
	t := &Tokens{}
	for _, tok := range tokens {
		t.digests = append(t.digests, sha256.Sum256([]byte(tok)))
	}
	return t
}

// Len returns how many tokens the set holds.
func (t *Tokens) Len() int { return len(t.digests) }

// Allows reports whether presented is one of the tokens. Every token is
// compared (no early exit), each in constant time.
func (t *Tokens) Allows(presented string) bool {
	d := sha256.Sum256([]byte(presented))
	ok := 0
	for i := range t.digests {
		ok |= subtle.ConstantTimeCompare(d[:], t.digests[i][:])
	}
	return ok == 1
}

// bearer returns the token of an "Authorization: Bearer TOKEN" header.
func bearer(r *http.Request) (string, bool) {
	h := r.Header.Get("Authorization")
	scheme, tok, ok := strings.Cut(h, " ")
	if !ok || !strings.EqualFold(scheme, "Bearer") {
		return "", false
	}
	tok = strings.TrimSpace(tok)
	return tok, tok != ""
}

// ErrExposed is returned by CheckExposure for a non-loopback address
// without tokens or an explicit opt-out.
var ErrExposed = errors.New("listening beyond this machine needs --token-file (or --no-auth to accept anyone)")

// CheckExposure decides whether the server may listen on addr: a loopback
// address (127.0.0.0/8, ::1, "localhost") is always allowed; any other
// address, including an empty host (every interface), only with tokens
// or when noAuth says so explicitly.
func CheckExposure(addr string, tokens *Tokens, noAuth bool) error {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return fmt.Errorf("--listen %q: %w", addr, err)
	}
	if IsLoopback(host) || (tokens != nil && tokens.Len() > 0) || noAuth {
		return nil
	}
	return fmt.Errorf("--listen %s: %w", addr, ErrExposed)
}

// IsLoopback reports whether host (no port) names only this machine.
func IsLoopback(host string) bool {
	if strings.EqualFold(host, "localhost") {
		return true
	}
	ip := net.ParseIP(strings.Trim(host, "[]"))
	return ip != nil && ip.IsLoopback()
}
