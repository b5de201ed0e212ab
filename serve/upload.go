package serve

import (
	"errors"
	"fmt"
	"io"
	"mime"
	"mime/multipart"
	"net"
	"net/http"
	"os"
	"path"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"
)

// upload is a request body received in full into the server's private
// folder. remove deletes it; it is safe to call more than once.
type upload struct {
	file  *os.File
	size  int64
	label string // the client's name for it, a label only
	spec  string // the spec field of a multipart body, if any
}

func (u *upload) remove() {
	if u.file != nil {
		name := u.file.Name()
		u.file.Close()
		os.Remove(name)
		u.file = nil
	}
}

// receiveError is a body that could not be received; status is the answer.
type receiveError struct {
	status int
	reason string // metrics reason
	msg    string
}

func (e *receiveError) Error() string { return e.msg }

// maxFieldBytes caps a multipart form field (spec, name): they are short
// identifiers, never worth buffering more.
const maxFieldBytes = 1024

// receive streams the request body into a new private temporary file:
// the raw body, or the "file" part of a multipart/form-data body (with
// the optional "spec" and "name" fields). The body is limited to
// MaxUpload (an *http.MaxBytesError as soon as a byte beyond it is read)
// and every read must arrive within the stall timeout and before the
// request's read deadline. On any error the temporary file is gone.
func (s *Server) receive(w http.ResponseWriter, r *http.Request, label string) (*upload, error) {
	rc := http.NewResponseController(w)
	start := time.Now()
	body := &deadlineReader{
		r:     http.MaxBytesReader(w, r.Body, s.cfg.MaxUpload),
		rc:    rc,
		stall: s.cfg.StallTimeout,
		end:   start.Add(s.cfg.ReadTimeout),
	}
	// Once the body is in, no read deadline may be left on the connection:
	// the server's own background read would take it for a dead client
	// and cancel the check.
	defer rc.SetReadDeadline(time.Time{})

	u := &upload{label: label}
	mediaType, params, _ := mime.ParseMediaType(r.Header.Get("Content-Type"))
	var err error
	if mediaType == "multipart/form-data" {
		err = s.receiveMultipart(u, body, params["boundary"])
	} else {
		err = s.toTempFile(u, body)
	}
	if err != nil {
		u.remove()
		return nil, s.classify(err)
	}
	if u.label == "" {
		u.label = "upload"
	}
	return u, nil
}

// receiveMultipart reads the parts: the first "file" part goes to the
// temporary file; "spec" and "name" are short fields; other parts are
// read past.
func (s *Server) receiveMultipart(u *upload, body io.Reader, boundary string) error {
	if boundary == "" {
		return &receiveError{http.StatusBadRequest, reasonBadRequest, "multipart/form-data body without a boundary parameter"}
	}
	mr := multipart.NewReader(body, boundary)
	for {
		part, err := mr.NextPart()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return wrapBodyError(err, "reading the multipart body")
		}
		switch part.FormName() {
		case "file":
			if u.file != nil {
				part.Close()
				return &receiveError{http.StatusBadRequest, reasonBadRequest, "multipart body has more than one file part: send one file per request"}
			}
			if u.label == "" {
				u.label = Label(part.FileName())
			}
			if err := s.toTempFile(u, part); err != nil {
				part.Close()
				return err
			}
		case "spec", "name":
			v, err := io.ReadAll(io.LimitReader(part, maxFieldBytes+1))
			if err != nil {
				return wrapBodyError(err, "reading the multipart body")
			}
			if len(v) > maxFieldBytes {
				return &receiveError{http.StatusBadRequest, reasonBadRequest, fmt.Sprintf("multipart field %q is longer than %d bytes", part.FormName(), maxFieldBytes)}
			}
			if part.FormName() == "spec" {
				u.spec = strings.TrimSpace(string(v))
			} else if n := Label(string(v)); n != "" {
				u.label = n
			}
		default:
			if _, err := io.Copy(io.Discard, part); err != nil {
				return wrapBodyError(err, "reading the multipart body")
			}
		}
		part.Close()
	}
	if u.file == nil {
		return &receiveError{http.StatusBadRequest, reasonBadRequest, `multipart body has no "file" part`}
	}
	return nil
}

// toTempFile copies src into a new temporary file (mode 0600) in the
// server's private folder.
func (s *Server) toTempFile(u *upload, src io.Reader) error {
	f, err := os.CreateTemp(s.tmp, "upload-*")
	if err != nil {
		return &diskError{err}
	}
	u.file = f
	n, err := io.CopyBuffer(diskWriter{f}, src, make([]byte, 64<<10))
	u.size = n
	if err != nil {
		var de *diskError
		if errors.As(err, &de) {
			return err
		}
		return wrapBodyError(err, "receiving the upload")
	}
	return nil
}

// diskWriter marks its errors as the server's own (a full disk), not the
// client's.
type diskWriter struct{ f *os.File }

func (d diskWriter) Write(p []byte) (int, error) {
	n, err := d.f.Write(p)
	if err != nil {
		err = &diskError{err}
	}
	return n, err
}

// diskError is a failure of the server's own disk, not of the client.
type diskError struct{ err error }

func (e *diskError) Error() string { return "storing the upload: " + e.err.Error() }
func (e *diskError) Unwrap() error { return e.err }

func wrapBodyError(err error, doing string) error {
	return fmt.Errorf("%s: %w", doing, err)
}

// classify turns a receiving error into the answer.
func (s *Server) classify(err error) *receiveError {
	var re *receiveError
	var tooBig *http.MaxBytesError
	var ne net.Error
	var de *diskError
	switch {
	case errors.As(err, &re):
		return re
	case errors.As(err, &de):
		s.log.Error("cannot store uploads", "dir", s.tmp, "err", de.err)
		return &receiveError{http.StatusInternalServerError, reasonIncomplete, "the server could not store the upload"}
	case errors.As(err, &tooBig):
		return &receiveError{http.StatusRequestEntityTooLarge, reasonTooLarge,
			fmt.Sprintf("upload larger than the %s this server accepts", formatBytes(tooBig.Limit))}
	case errors.As(err, &ne) && ne.Timeout():
		return &receiveError{http.StatusRequestTimeout, reasonIncomplete,
			fmt.Sprintf("the upload stalled or took too long (no data for %v, or more than %v in all)", s.cfg.StallTimeout, s.cfg.ReadTimeout)}
	case errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, net.ErrClosed):
		return &receiveError{http.StatusBadRequest, reasonIncomplete, "the upload ended before its declared length: " + err.Error()}
	}
	if strings.Contains(err.Error(), "multipart") {
		return &receiveError{http.StatusBadRequest, reasonBadRequest, err.Error()}
	}
	return &receiveError{http.StatusBadRequest, reasonIncomplete, err.Error()}
}

// deadlineReader moves the connection's read deadline before every read:
// at most the stall timeout from now, and never past the end of the
// request's whole time. A client that stops sending loses its upload
// within the stall timeout, so it cannot hold a place in the queue.
type deadlineReader struct {
	r     io.Reader
	rc    *http.ResponseController
	stall time.Duration
	end   time.Time
}

func (d *deadlineReader) Read(p []byte) (int, error) {
	dl := time.Now().Add(d.stall)
	if dl.After(d.end) {
		dl = d.end
	}
	d.rc.SetReadDeadline(dl) // not supported (HTTP/2 through some proxies): the server's ReadTimeout still holds
	return d.r.Read(p)
}

// maxLabel caps a label's length in bytes.
const maxLabel = 200

// Label makes the client's file name into a label for the record: only
// its last path element, control and format characters dropped, at most
// 200 bytes. It is never used to build a path on the server.
func Label(name string) string {
	name = strings.ReplaceAll(name, `\`, "/")
	name = path.Base(strings.TrimRight(name, "/"))
	if name == "." || name == "/" || name == ".." {
		return ""
	}
	var b strings.Builder
	for _, r := range name {
		if r == utf8.RuneError || unicode.IsControl(r) || unicode.Is(unicode.Cf, r) {
			continue
		}
		if b.Len()+utf8.RuneLen(r) > maxLabel {
			break
		}
		b.WriteRune(r)
	}
	return strings.TrimSpace(b.String())
}

// formatBytes writes a byte count with a binary unit, e.g. "8 GiB".
func formatBytes(n int64) string {
	units := []string{"bytes", "KiB", "MiB", "GiB", "TiB"}
	v := float64(n)
	i := 0
	for v >= 1024 && i < len(units)-1 {
		v /= 1024
		i++
	}
	if i == 0 {
		return fmt.Sprintf("%d bytes", n)
	}
	if v == float64(int64(v)) {
		return fmt.Sprintf("%d %s", int64(v), units[i])
	}
	return fmt.Sprintf("%.1f %s", v, units[i])
}
