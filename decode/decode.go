// Package decode turns delivered audio files into streams of PCM samples for
// the loudness engine.
//
// Every container (WAV/RF64/BW64, FLAC, MP3, AIFF) lives in a sub-package that
// registers itself with Register from an init function, the way image/png
// registers with package image. A caller imports the formats it wants for
// their side effect and opens files with Open or New; the format is detected
// from the file's content (magic bytes), never from its extension.
//
// Decoding is streaming: New reads only the header, and ReadFrames then fills
// a caller-owned buffer block by block, so memory does not grow with the
// length of the file. Samples are float64, interleaved, scaled so that integer
// full scale is ±1.0 (float files may exceed it and are passed on as they
// are).
package decode

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
)

// SampleFormat says how the file stores its samples.
type SampleFormat string

// The sample formats a file may declare.
const (
	Int   SampleFormat = "int"
	Float SampleFormat = "float"
)

// Info describes a stream as its header declares it. Decoders fill it before
// the first sample is read.
type Info struct {
	// Container is the detected file type: "wav", "rf64", "bw64", "flac",
	// "mp3", "aiff" or "aifc".
	Container string
	// Codec names the sample coding inside the container, e.g. "pcm",
	// "ieee-float", "flac", "mpeg-1 layer 3".
	Codec string
	// SampleRate is in hertz.
	SampleRate int
	// Channels is the number of interleaved channels ReadFrames delivers.
	Channels int
	// Layout holds one label per channel in stream order (see layout.go), or
	// nil when the file says nothing about its layout; callers then fall back
	// to DefaultLayout.
	Layout []string
	// ChannelMask is the WAVE_FORMAT_EXTENSIBLE dwChannelMask (or the FLAC
	// tag of the same name), 0 when absent.
	ChannelMask uint32
	// BitsPerSample is the number of significant bits per sample (the
	// "valid bits" of an extensible WAV), 0 for lossy formats (MP3), which
	// have no bit depth.
	BitsPerSample int
	// SampleFormat is Int or Float.
	SampleFormat SampleFormat
	// Frames is the length in sample frames the header declares, or -1 when
	// the header does not say (the true length is what ReadFrames returns).
	Frames int64
	// BitRate is the average coded bit rate in bits per second for
	// compressed formats, 0 otherwise.
	BitRate int
	// Mode is a format-specific description of the channel coding, e.g.
	// "joint stereo" for MP3; empty when it adds nothing.
	Mode string
	// BitRateMode is "cbr", "vbr" or "abr" for compressed formats that
	// say (an MP3's Xing/Info/LAME header, or constant frame sizes), ""
	// when unknown or not applicable.
	BitRateMode string
	// Tags lists the metadata blocks found around the audio, e.g.
	// "id3v2.3", "id3v1", "ape"; nil when there are none.
	Tags []string
	// Bext holds the Broadcast Wave extension chunk when the file has one.
	Bext *Bext
	// Undeclared is set when the file holds data after the audio its
	// header declares that is neither a chunk nor a tag (see Undeclared);
	// nil otherwise. ReadFrames delivers only the declared audio.
	Undeclared *Undeclared
}

// Decoder streams the samples of one file.
type Decoder interface {
	// Info returns the stream description read from the header.
	Info() Info
	// ReadFrames decodes up to len(dst)/Channels frames into dst as
	// interleaved samples and returns the number of frames written.
	// len(dst) must be a multiple of Channels. At the clean end of the
	// stream it returns 0, io.EOF. When the file is damaged it returns the
	// frames it could still decode together with an *IntegrityError, and
	// io.EOF after that. A decoder that resynchronises after damage (FLAC)
	// delivers the good frames that follow it too, and returns the
	// *IntegrityError, which then describes every damaged stretch, with
	// the last of them: the error always comes once, at the end.
	ReadFrames(dst []float64) (int, error)
}

// Noter is implemented by decoders that learn things while decoding that the
// user must be told (e.g. an MP3 decoder that clipped samples). Notes is
// called after ReadFrames returned io.EOF.
type Noter interface {
	Notes() []string
}

// Source is what a decoder reads from: *os.File and *bytes.Reader are both
// Sources.
type Source interface {
	io.Reader
	io.ReaderAt
	io.Seeker
}

// Format is a container that can be detected and decoded.
type Format struct {
	// Name is the container name used in Info.Container (the primary one
	// when a format has variants).
	Name string
	// Extensions are the file-name extensions (lower case, without the
	// dot) deliveries in this format carry. The content, not the name,
	// decides how a file is read; the name decides only that a file which
	// cannot be read is a broken delivery rather than something else in the
	// folder (see HasAudioExtension).
	Extensions []string
	// Match reports whether the content looks like this format. It may read
	// anywhere in r but must be cheap and must not panic on any input.
	Match func(r io.ReaderAt, size int64) bool
	// New reads the header from src (positioned at offset 0; size bytes
	// long) and returns a Decoder ready for ReadFrames. opt is passed per
	// call, so two files opened at once may use different options.
	New func(src Source, size int64, opt Options) (Decoder, error)
}

// Options tune decoding, per call. The zero value checks everything a
// format can check.
type Options struct {
	// SkipMD5 skips verifying a stream's MD5 signature of the decoded
	// audio (FLAC). Frame CRCs are still checked.
	SkipMD5 bool
}

var (
	formatsMu sync.RWMutex
	formats   []Format
)

// Register makes a format known to New and Open. Formats are tried in the
// order they were registered.
func Register(f Format) {
	formatsMu.Lock()
	defer formatsMu.Unlock()
	formats = append(formats, f)
}

// HasAudioExtension reports whether name ends in an extension a registered
// format claims (case does not matter): such a file is a delivery, and if
// it cannot be read that is an error, never a silent skip.
func HasAudioExtension(name string) bool {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(name), "."))
	if ext == "" {
		return false
	}
	formatsMu.RLock()
	defer formatsMu.RUnlock()
	for _, f := range formats {
		if slices.Contains(f.Extensions, ext) {
			return true
		}
	}
	return false
}

// Formats returns the names of the registered formats.
func Formats() []string {
	formatsMu.RLock()
	defer formatsMu.RUnlock()
	names := make([]string, len(formats))
	for i, f := range formats {
		names[i] = f.Name
	}
	return names
}

// ErrUnknownFormat is returned by New when no registered format matches the
// content.
var ErrUnknownFormat = errors.New("not a recognised audio file")

// New detects the format of src and returns its decoder, with the default
// options.
func New(src Source) (Decoder, error) { return NewWith(src, Options{}) }

// NewWith detects the format of src and returns its decoder, with opt.
func NewWith(src Source, opt Options) (Decoder, error) {
	size, err := src.Seek(0, io.SeekEnd)
	if err != nil {
		return nil, err
	}
	if size == 0 {
		return nil, &FormatError{Format: "audio", Offset: 0, Problem: "file is empty"}
	}
	formatsMu.RLock()
	fs := append([]Format(nil), formats...)
	formatsMu.RUnlock()
	for _, f := range fs {
		if !f.Match(src, size) {
			continue
		}
		if _, err := src.Seek(0, io.SeekStart); err != nil {
			return nil, err
		}
		return f.New(src, size, opt)
	}
	return nil, ErrUnknownFormat
}

// File is an open audio file: a Decoder plus the file it reads.
type File struct {
	Decoder
	f *os.File
}

// Open opens the named file with the default options and detects its
// format. Errors name the file.
func Open(path string) (*File, error) { return OpenWith(path, Options{}) }

// OpenWith opens the named file and detects its format, with opt. Only
// regular files are read (symbolic links to them are followed): a FIFO, a
// device or a socket is refused at once, without blocking on it. Errors
// name the file.
func OpenWith(path string, opt Options) (*File, error) {
	f, err := OpenRegular(path)
	if err != nil {
		return nil, err
	}
	d, err := NewWith(f, opt)
	if err != nil {
		f.Close()
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return &File{Decoder: d, f: f}, nil
}

// Close closes the underlying file.
func (f *File) Close() error { return f.f.Close() }

// Notes returns the decoder's notes when it keeps any.
func (f *File) Notes() []string {
	if n, ok := f.Decoder.(Noter); ok {
		return n.Notes()
	}
	return nil
}

// ErrNotRegular is returned (wrapped with the path) for a path that is not
// a regular file: a folder, FIFO, device or socket.
var ErrNotRegular = errors.New("not a regular file")

// OpenRegular opens path for reading only if it is a regular file. The file
// is opened without blocking (a FIFO would otherwise wait for a writer
// forever) and checked on the open descriptor, so a name swapped between a
// check and the open cannot slip through.
func OpenRegular(path string) (*os.File, error) {
	f, err := openNonBlocking(path)
	if err != nil {
		return nil, err
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, err
	}
	if !st.Mode().IsRegular() {
		f.Close()
		what := "not a regular file"
		if st.IsDir() {
			what = "is a directory, not a regular file"
		}
		return nil, fmt.Errorf("%s: %s: %w", path, what, ErrNotRegular)
	}
	if err := clearNonBlocking(f); err != nil {
		f.Close()
		return nil, err
	}
	return f, nil
}

// FormatError reports a header or structure the decoder cannot read.
type FormatError struct {
	Format  string // e.g. "wav"
	Offset  int64  // byte offset of the problem
	Problem string // what was expected and what was found
	// Err is the underlying error, if any (io.ErrUnexpectedEOF when the
	// file ends inside a structure); errors.Is sees through to it.
	Err error
}

func (e *FormatError) Error() string {
	if e.Err != nil {
		return fmt.Sprintf("invalid %s file at byte %d: %s: %v", e.Format, e.Offset, e.Problem, e.Err)
	}
	return fmt.Sprintf("invalid %s file at byte %d: %s", e.Format, e.Offset, e.Problem)
}

// Unwrap returns the underlying error.
func (e *FormatError) Unwrap() error { return e.Err }

// UnsupportedError reports a file that is well-formed but uses a coding
// kweigh does not measure (µ-law, ADPCM, MPEG-2.5 …).
type UnsupportedError struct {
	Format string // container, e.g. "wav"
	What   string // e.g. "µ-law (format tag 0x0007)"
}

func (e *UnsupportedError) Error() string {
	return fmt.Sprintf("unsupported %s: %s", e.Format, e.What)
}

// IntegrityError reports damaged audio found while decoding: truncated data,
// a CRC or checksum mismatch. The frames delivered before it are valid and
// may be measured, but the result must be flagged as coming from a damaged
// file.
type IntegrityError struct {
	Format  string
	Offset  int64 // byte offset where the damage was found (-1 if unknown)
	Problem string
}

func (e *IntegrityError) Error() string {
	if e.Offset < 0 {
		return fmt.Sprintf("damaged %s file: %s", e.Format, e.Problem)
	}
	return fmt.Sprintf("damaged %s file at byte %d: %s", e.Format, e.Offset, e.Problem)
}
