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

// The URL falls back to WARDLOAD_URL, the name every --url flag has.
func TestProbeURLFromEnvironment(t *testing.T) {
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.URL.Path != "/from-env" {
			w.WriteHeader(http.StatusNotFound)
		}
	}))
	defer srv.Close()
	var out, errb bytes.Buffer
	vars := map[string]string{"WARDLOAD_URL": srv.URL + "/from-env"}
	code := run(context.Background(), []string{"probe"}, &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(k string) string { return vars[k] }})
	if code != exitOK || out.String() != "ready\n" {
		t.Errorf("probe with WARDLOAD_URL: %d %q %q", code, out.String(), errb.String())
	}
}
