package server

import (
	"context"
	"io"
	"log/slog"
	"mime/multipart"
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/alexedwards/scs/sqlite3store"

	"wardload/internal/demo"
)

// serveFixture serves f's store over real HTTP on 127.0.0.1:0 with cfg
// changed by change, and returns the server and a function that starts
// the shutdown, whose result arrives on the returned channel.
func serveFixture(tb testing.TB, f *fixture, change func(*Config)) (*Server, context.CancelFunc, <-chan error) {
	tb.Helper()
	cfg := DefaultConfig()
	cfg.Addr = "127.0.0.1:0"
	cfg.Store = f.st
	cfg.Logger = slog.New(slog.NewTextHandler(f.logs, nil))
	cfg.Now = f.clock.Now
	cfg.SessionStore = sqlite3store.NewWithCleanupInterval(f.st.DB(), 0)
	change(&cfg)
	s, err := New(cfg)
	if err != nil {
		tb.Fatal(err)
	}
	if err := s.Listen(); err != nil {
		tb.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- s.Serve(ctx) }()
	tb.Cleanup(cancel)
	return s, cancel, done
}

// slowUpload starts a multipart import of content whose body the caller
// sends through the returned writer (closing it finishes the upload);
// the response arrives on the returned channel.
func slowUpload(tb testing.TB, url string, cookie *http.Cookie, content string) (io.WriteCloser, <-chan *http.Response) {
	tb.Helper()
	pr, pw := io.Pipe()
	mw := multipart.NewWriter(pw)
	req, err := http.NewRequest("POST", url, pr)
	if err != nil {
		tb.Fatal(err)
	}
	req.Header.Set("Content-Type", mw.FormDataContentType())
	req.AddCookie(cookie)
	out := make(chan *http.Response, 1)
	go func() {
		c := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
		res, err := c.Do(req)
		if err != nil {
			out <- &http.Response{StatusCode: -1, Status: err.Error(), Body: io.NopCloser(strings.NewReader(""))}
			return
		}
		out <- res
	}()
	fw, err := mw.CreateFormFile("file", "observations.csv")
	if err != nil {
		tb.Fatal(err)
	}
	if _, err := io.WriteString(fw, content[:len(content)/2]); err != nil {
		tb.Fatal(err)
	}
	rest := &finishUpload{pw: pw, mw: mw, fw: fw, tail: content[len(content)/2:]}
	return rest, out
}

type finishUpload struct {
	pw   *io.PipeWriter
	mw   *multipart.Writer
	fw   io.Writer
	tail string
}

func (u *finishUpload) Write(p []byte) (int, error) { return u.pw.Write(p) }
func (u *finishUpload) Close() error {
	io.WriteString(u.fw, u.tail)
	u.mw.Close()
	return u.pw.Close()
}

// TestShutdownDrainsImports: an import in flight when shutdown starts is
// let finish (and stored) while new imports are refused with 503 and
// Retry-After and /readyz says not ready; Serve returns once it is done.
func TestShutdownDrainsImports(t *testing.T) {
	f := newReviewFixture(t)
	before := wardObservations(t, f.st, f.ward.ID)
	s, stop, done := serveFixture(t, f.fixture, func(c *Config) { c.DrainTimeout = time.Minute })
	cookie := MustSession(t, s, f.users[pAdmin].ID)
	path := s.URL() + "/wards/" + demo.WardCode + "/observations/import"
	file := "date,shift,tier,window_hours,care_minutes,dependency_score\n2026-03-01,Day,t1,12.5,55,4\n2026-03-01,Night,t2,12.5,80,5\n"

	rest, answer := slowUpload(t, path, cookie, file)
	for s.ImportsInFlight() == 0 {
		time.Sleep(10 * time.Millisecond)
	}
	stop()
	for !s.draining.Load() {
		time.Sleep(10 * time.Millisecond)
	}
	res, err := http.Get(s.URL() + "/readyz")
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode != http.StatusServiceUnavailable {
		t.Errorf("/readyz while draining: %d, want 503", res.StatusCode)
	}
	req := upload(t, path, file)
	req.RequestURI = ""
	req.AddCookie(cookie)
	res, err = http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(res.Body)
	res.Body.Close()
	if res.StatusCode != http.StatusServiceUnavailable || res.Header.Get("Retry-After") == "" ||
		!strings.Contains(string(body), "nothing was imported") {
		t.Errorf("new import while draining: %d Retry-After %q\n%s", res.StatusCode, res.Header.Get("Retry-After"), body)
	}
	select {
	case err := <-done:
		t.Fatalf("Serve returned with an import in flight: %v", err)
	case <-time.After(200 * time.Millisecond):
	}
	rest.Close()
	res = <-answer
	res.Body.Close()
	if res.StatusCode != http.StatusSeeOther {
		t.Errorf("import in flight at shutdown: %d %s, want 303", res.StatusCode, res.Status)
	}
	if err := <-done; err != nil {
		t.Errorf("Serve: %v", err)
	}
	if n := wardObservations(t, f.st, f.ward.ID); n != before+2 {
		t.Errorf("observations %d → %d, want +2 (the drained import only)", before, n)
	}
}

// TestUploadLimitsPage: a file over the import limit and an upload slower
// than the read limit get a page that names the limit, points to another
// way to bring the data in, and keeps the person signed in (before: the
// 413 page did not state the limit and showed the manager signed out; a
// slow upload got plain text "Internal error.").
func TestUploadLimitsPage(t *testing.T) {
	f := newReviewFixture(t)
	path := "/wards/" + demo.WardCode + "/observations/import"
	big := "date,shift,tier,window_hours,care_minutes,dependency_score\n" + strings.Repeat("2026-03-01,Day,t1,12.5,55,4\n", maxImportBytes/27+1000)
	res, body := f.do(t, f.as(t, pAdmin, upload(t, path, big)))
	if res.StatusCode != http.StatusRequestEntityTooLarge {
		t.Fatalf("big upload: %d", res.StatusCode)
	}
	msg := byTestID(t, body, "error-message")
	if len(msg) != 1 || !strings.Contains(msg[0], "4 MiB") || !strings.Contains(msg[0], "nothing was imported") ||
		!strings.Contains(msg[0], "wardload observations import --ward "+demo.WardCode) {
		t.Errorf("413 message = %q, want the 4 MiB limit and the command-line import named", msg)
	}
	if !strings.Contains(body, f.users[pAdmin].Name) || strings.Contains(body, `href="/signin"`) {
		t.Errorf("413 page shows the manager signed out")
	}

	s, _, _ := serveFixture(t, f.fixture, func(c *Config) { c.ReadTimeout = time.Second })
	cookie := MustSession(t, s, f.users[pAdmin].ID)
	_, answer := slowUpload(t, s.URL()+path, cookie, "date,shift,tier,window_hours,care_minutes,dependency_score\n2026-03-01,Day,t1,12.5,55,4\n")
	res = <-answer // the rest never comes
	b, _ := io.ReadAll(res.Body)
	res.Body.Close()
	page := string(b)
	if res.StatusCode != http.StatusRequestTimeout {
		t.Fatalf("slow upload: %d %s\n%.3000s\nlog:\n%s", res.StatusCode, res.Status, page, f.logs)
	}
	if !strings.Contains(page, "time limit of 1s") || !strings.Contains(page, "nothing was saved") ||
		!strings.Contains(page, "wardload observations import --ward "+demo.WardCode) ||
		!strings.Contains(page, f.users[pAdmin].Name) || strings.Count(page, "<html") != 1 {
		t.Errorf("slow-upload page does not name the limit or shows the manager signed out:\n%s", page)
	}
}
