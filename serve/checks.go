package serve

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"net/http"
	"strconv"
	"strings"
	"time"

	"github.com/kweigh/kweigh/decode"
	"github.com/kweigh/kweigh/reports"
	"github.com/kweigh/kweigh/reports/htmlpage"
	"github.com/kweigh/kweigh/rules"
)

// Caution heads every HTML report the server writes.
const Caution = "Full-scale test signals and gain increases can damage hearing and loudspeakers: keep monitoring " +
	"levels down when auditioning. A pass is not a broadcaster's or regulator's acceptance; local regulation " +
	"and the receiving party's own QC decide."

// Response headers of POST /v1/checks.
const (
	HeaderVerdict = "Kweigh-Verdict"  // pass, warn, fail or error
	HeaderCheckID = "Kweigh-Check-Id" // the id of the check
)

// postCheck receives an upload, judges it and answers with the check's
// JSON object (or, for Accept: text/html, its HTML report).
func (s *Server) postCheck(w http.ResponseWriter, r *http.Request, rec *requestLog) {
	q := r.URL.Query()
	specID := strings.TrimSpace(q.Get("spec"))
	if _, ok := s.cfg.Catalogue.Lookup(specID); !ok {
		s.refuse(w, rec, http.StatusBadRequest, reasonBadRequest, s.unknownSpec(specID))
		return
	}
	if r.ContentLength > s.cfg.MaxUpload {
		s.refuse(w, rec, http.StatusRequestEntityTooLarge, reasonTooLarge,
			fmt.Sprintf("upload of %d bytes is larger than the %s this server accepts", r.ContentLength, formatBytes(s.cfg.MaxUpload)))
		return
	}
	if s.draining.Load() {
		w.Header().Set("Retry-After", "5")
		s.refuse(w, rec, http.StatusServiceUnavailable, reasonBusy, "the server is shutting down")
		return
	}
	select {
	case s.slots <- struct{}{}:
	default:
		w.Header().Set("Retry-After", strconv.Itoa(s.retryAfter()))
		s.refuse(w, rec, http.StatusServiceUnavailable, reasonBusy,
			fmt.Sprintf("busy: %d checks running and %d uploads waiting; try again later", s.cfg.Jobs, s.cfg.Queue))
		return
	}
	s.metrics.addUploads(1)
	defer func() {
		s.metrics.addUploads(-1)
		<-s.slots
	}()

	up, err := s.receive(w, r, Label(q.Get("name")))
	if err != nil {
		var re *receiveError
		errors.As(err, &re)
		if re.status == http.StatusRequestEntityTooLarge || re.reason == reasonIncomplete {
			w.Header().Set("Connection", "close")
		}
		s.refuse(w, rec, re.status, re.reason, re.msg)
		return
	}
	defer up.remove()
	rec.size = up.size
	if up.spec != "" {
		specID = up.spec
	}
	spec, ok := s.cfg.Catalogue.Lookup(specID)
	if !ok {
		s.refuse(w, rec, http.StatusBadRequest, reasonBadRequest, s.unknownSpec(specID))
		return
	}
	rec.spec = spec.ID
	if up.size == 0 {
		s.refuse(w, rec, http.StatusUnprocessableEntity, reasonNotAudio, "the upload is empty (0 bytes): send the audio file as the request body")
		return
	}
	s.metrics.received(up.size)

	// Wait for a worker; a client that gives up while waiting frees its place.
	select {
	case s.workers <- struct{}{}:
	case <-r.Context().Done():
		s.refuse(w, rec, http.StatusServiceUnavailable, reasonIncomplete, "the client went away while waiting")
		return
	}
	s.metrics.addInFlight(1)
	res, took, err := s.check(r.Context(), up, spec)
	s.metrics.addInFlight(-1)
	<-s.workers
	up.remove() // the verdict is in: the audio is not needed any more
	var qe *remoteError
	if errors.As(err, &qe) {
		w.Header().Set("Retry-After", "30")
		s.refuse(w, rec, http.StatusServiceUnavailable, reasonBusy, qe.Error())
		return
	}
	if err != nil {
		s.refuse(w, rec, http.StatusUnprocessableEntity, reasonNotAudio, err.Error())
		return
	}
	if ctxErr := r.Context().Err(); ctxErr != nil {
		// The client went away, or the shutdown's grace ran out: nobody
		// waits for this verdict.
		s.metrics.reject(reasonIncomplete)
		rec.problem = "check abandoned: " + ctxErr.Error()
		w.WriteHeader(http.StatusServiceUnavailable)
		return
	}
	if res == nil || res.Measurement == nil {
		s.refuse(w, rec, http.StatusInternalServerError, reasonBadRequest, "the judge gave no result")
		return
	}
	s.metrics.checked(res.Verdict, took, res.DurationS)
	rec.verdict = string(res.Verdict)

	id := rec.id
	obj, err := s.checkJSON(res, id)
	if err != nil {
		s.refuse(w, rec, http.StatusInternalServerError, reasonBadRequest, err.Error())
		return
	}
	wantHTML := prefersHTML(r)
	var page []byte
	if wantHTML || s.cfg.KeepDir != "" {
		if page, err = s.reportHTML(res, spec); err != nil {
			s.log.Error("html report", "id", id, "err", err)
			page = nil
		}
	}
	if s.cfg.KeepDir != "" {
		if err := s.keep(id, obj, page); err != nil {
			s.log.Error("keeping the reports", "id", id, "dir", s.cfg.KeepDir, "err", err)
		}
	}
	http.NewResponseController(w).SetWriteDeadline(time.Now().Add(s.cfg.WriteTimeout))
	w.Header().Set(HeaderVerdict, string(res.Verdict))
	w.Header().Set(HeaderCheckID, id)
	if wantHTML && page != nil {
		w.Header().Set("Content-Security-Policy", reportCSP)
		writeBody(w, http.StatusOK, "text/html; charset=utf-8", page)
		return
	}
	writeBody(w, http.StatusOK, "application/json", obj)
}

// check opens the received file as audio and judges it. An error means the
// upload is not audio kweigh reads (answered 422); a damaged file is
// judged.
func (s *Server) check(ctx context.Context, up *upload, spec *rules.Spec) (*rules.Result, time.Duration, error) {
	start := time.Now()
	if _, err := up.file.Seek(0, 0); err != nil {
		return nil, 0, fmt.Errorf("%s: %w", up.label, err)
	}
	d, err := decode.NewWith(up.file, decode.Options{})
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", up.label, err)
	}
	if c, ok := d.(io.Closer); ok {
		defer c.Close() // a decoder with a child process (the ffmpeg bridge)
	}
	if s.cfg.Remote != nil {
		// The header read: it is audio. The judging is the queue's.
		res, err := s.cfg.Remote(ctx, up.label, up.file.Name(), spec)
		if err != nil {
			return nil, 0, &remoteError{err}
		}
		return res, time.Since(start), nil
	}
	res := s.judge(ctx, up.label, d, spec)
	return res, time.Since(start), nil
}

// remoteError is a failure of Config.Remote (the queue could not be
// reached): answered 503 with Retry-After, not as a fault of the upload.
type remoteError struct{ err error }

func (e *remoteError) Error() string { return "the work queue did not answer: " + e.err.Error() }
func (e *remoteError) Unwrap() error { return e.err }

// refuse answers a request to judge an upload without a verdict and counts
// why.
func (s *Server) refuse(w http.ResponseWriter, rec *requestLog, status int, reason, msg string) {
	s.metrics.reject(reason)
	rec.problem = msg
	writeError(w, status, msg)
}

func (s *Server) unknownSpec(id string) string {
	ids := make([]string, 0)
	for _, sp := range s.cfg.Catalogue.Specs() {
		ids = append(ids, sp.ID)
	}
	return fmt.Sprintf("unknown spec %q (on offer: %s)", id, strings.Join(ids, ", "))
}

// retryAfter estimates in whole seconds when a place may be free: the
// mean check time for every upload ahead, shared among the workers.
func (s *Server) retryAfter() int {
	mean := s.metrics.meanCheckSeconds()
	secs := int(math.Ceil(mean * float64(s.cfg.Jobs+s.cfg.Queue) / float64(s.cfg.Jobs)))
	return min(max(secs, 1), 120)
}

// checkJSON is the object `kweigh check --format json` gives for the file,
// with "id" first. It is taken from the JSON Lines writer, so the two
// cannot drift apart.
func (s *Server) checkJSON(res *rules.Result, id string) ([]byte, error) {
	var b bytes.Buffer
	cw, err := reports.NewCheckWriter(&b, reports.JSONL, reports.Options{Spec: res.Spec, Version: s.cfg.Version, Clock: s.cfg.Clock})
	if err != nil {
		return nil, err
	}
	if err := cw.Write(res); err != nil {
		return nil, err
	}
	if err := cw.Close(reports.Summary{}); err != nil {
		return nil, err
	}
	line, _, _ := bytes.Cut(b.Bytes(), []byte("\n"))
	if len(line) < 2 || line[0] != '{' {
		return nil, fmt.Errorf("%s: the report writer gave no JSON object", res.Path)
	}
	out := make([]byte, 0, len(line)+64)
	out = append(out, `{"id":"`...)
	out = append(out, id...)
	out = append(out, '"')
	if len(line) > 2 {
		out = append(out, ',')
	}
	out = append(out, line[1:]...)
	return append(out, '\n'), nil
}

// reportHTML is the check's HTML QC page.
func (s *Server) reportHTML(res *rules.Result, spec *rules.Spec) ([]byte, error) {
	var b bytes.Buffer
	page := htmlpage.Page{
		Title:     "kweigh delivery check — " + res.Path,
		Generated: s.cfg.Clock(),
		Specs:     []string{spec.ID},
		Entries:   []htmlpage.Entry{{Result: res, Target: htmlpage.TargetFor(spec, res.Channels)}},
		Caution:   Caution,
	}
	if err := htmlpage.Write(&b, page); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// prefersHTML reports whether the client asked for the HTML report rather
// than JSON (Accept: text/html without application/json ranked first).
func prefersHTML(r *http.Request) bool {
	for _, part := range strings.Split(r.Header.Get("Accept"), ",") {
		mt, _, _ := strings.Cut(strings.TrimSpace(part), ";")
		switch strings.ToLower(strings.TrimSpace(mt)) {
		case "text/html":
			return true
		case "application/json", "*/*":
			return false
		}
	}
	return false
}
