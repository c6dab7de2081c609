package server

import (
	"fmt"
	"os"
	"regexp"
	"strconv"
	"testing"
)

// TestREADMEBodyLimits checks that the README's table of request body
// limits states the route table's: every route with a limit of its own
// is listed with it, nothing else is listed, and the default is right.
func TestREADMEBodyLimits(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	stated := map[string]int64{}
	for _, m := range regexp.MustCompile("(?m)^\\| `([A-Z]+ [^`]+)` \\| (\\d+) KiB").FindAllSubmatch(readme, -1) {
		n, _ := strconv.ParseInt(string(m[2]), 10, 64)
		stated[string(m[1])] = n << 10
	}
	m := regexp.MustCompile(`(?m)^\| any other route \| (\d+) KiB`).FindSubmatch(readme)
	if m == nil {
		t.Fatal("README states no default body limit")
	}
	s, _ := MustNew(t, newFakeStore())
	if def, _ := strconv.ParseInt(string(m[1]), 10, 64); def<<10 != s.cfg.MaxBodyBytes {
		t.Errorf("README default %d KiB, server %d bytes", def, s.cfg.MaxBodyBytes)
	}
	for _, rt := range s.Routes() {
		key := fmt.Sprintf("%s %s", rt.Method, rt.Pattern)
		if rt.MaxBodyBytes == 0 {
			continue
		}
		if got, ok := stated[key]; !ok {
			t.Errorf("README does not list %s (%d bytes)", key, rt.MaxBodyBytes)
		} else if got != rt.MaxBodyBytes {
			t.Errorf("README states %s: %d bytes; route table %d", key, got, rt.MaxBodyBytes)
		}
		delete(stated, key)
	}
	for key := range stated {
		t.Errorf("README lists %s, which has no limit of its own in the route table", key)
	}
}
