package serve

import (
	"bytes"
	"io"
	"log/slog"
	"mime/multipart"
	"net/http"
	"net/http/httptest"
	"os"
	"testing"
)

// FuzzUpload sends arbitrary bodies, as raw uploads and under a
// multipart/form-data content type, through the server's handler: never a
// panic, always one of the documented statuses, never a temporary file
// left behind.
func FuzzUpload(f *testing.F) {
	small := tone{seconds: 0.5, dBFS: -23}.wav()
	var form bytes.Buffer
	mw := multipart.NewWriter(&form)
	mw.SetBoundary("kweigh-fuzz-boundary")
	mw.WriteField("spec", "podcast")
	fw, _ := mw.CreateFormFile("file", "a.wav")
	fw.Write(small)
	mw.Close()
	f.Add(small, false)
	f.Add(form.Bytes(), true)
	f.Add(form.Bytes()[:len(form.Bytes())/2], true)
	f.Add(notAudio, false)
	f.Add(small[:60], false)
	f.Add([]byte{}, true)

	srv, err := New(Config{Catalogue: catalogue(f), Jobs: 1, TempDir: f.TempDir(), MaxUpload: 1 << 20,
		Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		f.Fatal(err)
	}
	f.Cleanup(func() { srv.Close() })
	h := srv.Handler()
	allowed := map[int]bool{200: true, 400: true, 408: true, 413: true, 422: true}
	f.Fuzz(func(t *testing.T, body []byte, multi bool) {
		req := httptest.NewRequest("POST", "/v1/checks?name=fuzz.wav", bytes.NewReader(body))
		if multi {
			req.Header.Set("Content-Type", "multipart/form-data; boundary=kweigh-fuzz-boundary")
		}
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, req)
		if !allowed[rec.Code] {
			t.Fatalf("status %d: %s", rec.Code, rec.Body.Bytes())
		}
		if rec.Code == http.StatusOK && rec.Header().Get(HeaderVerdict) == "" {
			t.Fatalf("200 without a verdict")
		}
		if entries, _ := os.ReadDir(srv.TempDir()); len(entries) != 0 {
			t.Fatalf("temporary files left: %d", len(entries))
		}
	})
}
