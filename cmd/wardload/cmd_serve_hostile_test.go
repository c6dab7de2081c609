package main

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"os"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"wardload/internal/password"
	"wardload/internal/wardload"
)

// hostileSignInBound is the resident memory the server may reach while
// 200 wrong-password sign-ins arrive at once. Each argon2id check takes
// 64 MiB; before the hash gate, 24 of them took the server to 1.5 GB, and
// 200 would need about 13 GB. With two hashes at a time the server stays
// near 200 MiB; the bound leaves room for the test binary and the GC.
const hostileSignInBound = 1 << 30

// TestServeHostileSignInMemory sends 200 parallel sign-ins with wrong
// passwords (to a real account and to unknown names) and reads the peak
// resident memory of the process, which is the server's here, from /proc.
// Every answer must be a refusal (401, 429 or 503), never a 5xx error.
func TestServeHostileSignInMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("hashes passwords under load")
	}
	if _, err := os.Stat("/proc/self/status"); err != nil {
		t.Skip("needs /proc")
	}
	// The other tests hash with cheap parameters for speed; this one is
	// about the production cost (zero parameters), for the account signed
	// in to and every sign-in. The copied demo's hashes are cheap, so the
	// account's hash is made again at production cost.
	dir, accounts := mustDemoDataDir(t)
	st := openTestStore(t, dir)
	ctx := context.Background()
	u, err := st.FindUserByName(ctx, "demo.charge1")
	if err != nil {
		t.Fatal(err)
	}
	hash, err := password.Params{}.Hash(accounts["demo.charge1"])
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.UpdateUser(wardload.WithActor(ctx, wardload.Actor{Name: "test"}), u.ID, wardload.UserUpdate{PasswordHash: &hash}); err != nil {
		t.Fatal(err)
	}
	st.Close()
	s := mustServeWith(t, nil, password.Params{}, "--addr", "127.0.0.1:0", "--data-dir", dir)
	// Reset the peak (VmHWM) so it covers the burst only; where the kernel
	// refuses, the peak since start is a stricter measure.
	os.WriteFile("/proc/self/clear_refs", []byte("5"), 0)
	const n = 200
	var mu sync.Mutex
	statuses := map[int]int{}
	var peak int64
	stop := make(chan struct{})
	sampled := make(chan struct{})
	go func() { // VmHWM may be unavailable; sample VmRSS as well
		defer close(sampled)
		for {
			peak = max(peak, procStatusKiB(t, "VmRSS"))
			select {
			case <-stop:
				return
			case <-time.After(5 * time.Millisecond):
			}
		}
	}()
	var wg sync.WaitGroup
	c := &http.Client{Transport: &http.Transport{MaxConnsPerHost: n, MaxIdleConnsPerHost: n}}
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			name := "demo.charge1"
			if i%2 == 1 {
				name = fmt.Sprintf("nobody%d", i)
			}
			res, err := c.PostForm(s.URL+"/signin", url.Values{"name": {name}, "password": {fmt.Sprintf("wrong-password-%d", i)}})
			code := 0
			if err == nil {
				io.Copy(io.Discard, res.Body)
				res.Body.Close()
				code = res.StatusCode
			}
			mu.Lock()
			statuses[code]++
			mu.Unlock()
		}()
	}
	wg.Wait()
	close(stop)
	<-sampled
	peak = max(peak, procStatusKiB(t, "VmHWM"))
	t.Logf("answers %v; peak resident memory %d MiB (bound %d MiB)", statuses, peak>>10, hostileSignInBound>>20)
	for code, k := range statuses {
		if code != http.StatusUnauthorized && code != http.StatusTooManyRequests && code != http.StatusServiceUnavailable {
			t.Errorf("%d sign-ins answered %d; want only 401, 429 or 503", k, code)
		}
	}
	if statuses[http.StatusUnauthorized] == 0 {
		t.Errorf("no sign-in was checked (no 401): the burst did not exercise hashing")
	}
	if peak<<10 > hostileSignInBound {
		t.Errorf("peak resident memory %d MiB, bound %d MiB", peak>>10, hostileSignInBound>>20)
	}
	s.Stop(t)
}

// procStatusKiB reads a "kB" field of /proc/self/status.
func procStatusKiB(t *testing.T, field string) int64 {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		t.Error(err)
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), field+":"); ok {
			v, _ := strconv.ParseInt(strings.TrimSuffix(strings.TrimSpace(rest), " kB"), 10, 64)
			return v
		}
	}
	return 0
}
