package main

import (
	"bytes"
	"context"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
)

func TestProbe(t *testing.T) {
	status := http.StatusOK
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) { w.WriteHeader(status) }))
	defer srv.Close()
	probe := func(url string) (int, string) {
		var out, errb bytes.Buffer
		code := run(context.Background(), []string{"probe", "--url", url}, &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }})
		return code, out.String() + errb.String()
	}
	if code, msg := probe(srv.URL); code != exitOK {
		t.Errorf("ready server: %d %q", code, msg)
	}
	status = http.StatusServiceUnavailable
	if code, msg := probe(srv.URL); code != exitFailure || !strings.Contains(msg, "503") {
		t.Errorf("unready server: %d %q", code, msg)
	}
	srv.Close()
	if code, _ := probe(srv.URL); code != exitFailure {
		t.Errorf("closed server: %d", code)
	}
	if code, _ := probe("::not a url"); code != exitUsage {
		t.Errorf("bad url: %d", code)
	}
}
