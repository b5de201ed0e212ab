package external

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"github.com/kweigh/kweigh/decode"
)

// EnvFFmpeg names the environment variable that sets the ffmpeg path when
// decode.Options.FFmpeg is empty.
const EnvFFmpeg = "KWEIGH_FFMPEG"

// DefaultTimeout is how long a child may go without producing anything
// before it is stopped (decode.Options.ChildTimeout overrides it).
const DefaultTimeout = 60 * time.Second

// MissingError reports a recognised container that cannot be read because
// ffmpeg (or ffprobe) is not there.
type MissingError struct {
	Kind    Kind   // the recognised container
	Program string // the program that was looked for
	Err     error  // why it could not be run
}

func (e *MissingError) Error() string {
	return fmt.Sprintf("%s file: kweigh reads %s through ffmpeg, and %s cannot be run (%v); install ffmpeg (apt-get install ffmpeg) or name it with --ffmpeg PATH or %s",
		e.Kind, e.Kind, e.Program, e.Err, EnvFFmpeg)
}

// Unwrap returns the underlying error.
func (e *MissingError) Unwrap() error { return e.Err }

// tools are the two programs the bridge runs.
type tools struct {
	ffmpeg, ffprobe string
	version         string // e.g. "5.1.9-0+deb12u1"
	layouts         map[string][]string
}

var (
	toolsMu    sync.Mutex
	toolsCache = map[string]*tools{}
)

// findTools resolves the ffmpeg path of opt (or the environment, or PATH)
// and ffprobe beside it, and learns ffmpeg's version and channel layouts
// once per path.
func findTools(kind Kind, opt decode.Options) (*tools, error) {
	name := opt.FFmpeg
	if name == "" {
		name = os.Getenv(EnvFFmpeg)
	}
	if name == "" {
		name = "ffmpeg"
	}
	toolsMu.Lock()
	defer toolsMu.Unlock()
	if t, ok := toolsCache[name]; ok {
		return t, nil
	}
	ffmpeg, err := exec.LookPath(name)
	if err != nil {
		return nil, &MissingError{Kind: kind, Program: name, Err: err}
	}
	probeName := "ffprobe"
	if strings.ContainsRune(name, filepath.Separator) {
		dir, base := filepath.Split(ffmpeg)
		probeName = filepath.Join(dir, strings.Replace(base, "ffmpeg", "ffprobe", 1))
	}
	ffprobe, err := exec.LookPath(probeName)
	if err != nil {
		return nil, &MissingError{Kind: kind, Program: probeName, Err: err}
	}
	t := &tools{ffmpeg: ffmpeg, ffprobe: ffprobe}
	timeout := max(opt.ChildTimeout, DefaultTimeout) // asked once per path
	out, err := runQuick(timeout, ffmpeg, "-hide_banner", "-version")
	if err != nil {
		return nil, &MissingError{Kind: kind, Program: ffmpeg, Err: err}
	}
	first, _, _ := strings.Cut(string(out), "\n")
	if f := strings.Fields(first); len(f) >= 3 && f[1] == "version" {
		t.version = f[2]
	}
	out, err = runQuick(timeout, ffmpeg, "-hide_banner", "-layouts")
	if err != nil {
		return nil, &MissingError{Kind: kind, Program: ffmpeg, Err: err}
	}
	t.layouts = parseLayouts(out)
	toolsCache[name] = t
	return t, nil
}

// runQuick runs a short command with a time limit and returns its stdout.
func runQuick(timeout time.Duration, name string, args ...string) ([]byte, error) {
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, name, args...)
	var stderr bytes.Buffer
	cmd.Stderr = &limited{buf: &stderr, max: 4096}
	out, err := cmd.Output()
	if ctx.Err() != nil {
		return nil, fmt.Errorf("%s did not answer within %v", filepath.Base(name), timeout)
	}
	if err != nil {
		if msg := firstLine(stderr.String()); msg != "" {
			return nil, fmt.Errorf("%w: %s", err, msg)
		}
		return nil, err
	}
	return out, nil
}

// parseLayouts reads the table "ffmpeg -layouts" prints (NAME and
// DECOMPOSITION columns under "Standard channel layouts:"), so that the
// bridge knows the channel order of exactly the ffmpeg it runs.
func parseLayouts(out []byte) map[string][]string {
	m := map[string][]string{}
	sc := bufio.NewScanner(bytes.NewReader(out))
	in := false
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "Standard channel layouts") {
			in = true
			continue
		}
		f := strings.Fields(line)
		if !in || len(f) != 2 || f[0] == "NAME" {
			continue
		}
		m[f[0]] = strings.Split(f[1], "+")
	}
	return m
}

// limited is a writer that keeps the first max bytes and drops the rest.
type limited struct {
	mu  sync.Mutex
	buf *bytes.Buffer
	max int
}

func (l *limited) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	if room := l.max - l.buf.Len(); room > 0 {
		l.buf.Write(p[:min(len(p), room)])
	}
	return len(p), nil
}

func (l *limited) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.buf.String()
}

// firstLine returns the first non-empty line of s, trimmed.
func firstLine(s string) string {
	for line := range strings.SplitSeq(s, "\n") {
		if line = strings.TrimSpace(line); line != "" {
			return line
		}
	}
	return ""
}

var errNoAudio = errors.New("no audio stream")

// Error reports a recognised container that ffprobe or ffmpeg cannot read,
// or whose streams cannot be measured as they are.
type Error struct {
	Kind    Kind
	Problem string
	Err     error // the underlying error, if any
}

func (e *Error) Error() string {
	if e.Err != nil {
		return fmt.Sprintf("invalid %s file: %s: %v", e.Kind, e.Problem, e.Err)
	}
	return fmt.Sprintf("invalid %s file: %s", e.Kind, e.Problem)
}

// Unwrap returns the underlying error.
func (e *Error) Unwrap() error { return e.Err }
