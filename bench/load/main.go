// Command load drives a running wardload server with many connections at
// once, mixing what a ward's staff and its integrations do: signed-in page
// views, projection pages, API calls with a token and census saves. It
// prints requests/s, p50 and p99 latency and every non-2xx/3xx answer, and
// afterwards compares the census saves the server acknowledged (303 to a
// projection) with the revisions the server has stored: every acknowledged
// save must be there.
//
// It is a benchmark driver for bench/load.sh, not a test; it talks only to
// the address it is given (loopback in the script).
//
//	go run ./bench/load -base http://127.0.0.1:8089 -password … -token … -c 200 -d 60s
package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"html"
	"io"
	"maps"
	"math"
	"math/rand/v2"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"os"
	"regexp"
	"slices"
	"strings"
	"sync"
	"time"
)

type config struct {
	base, user, password, token, ward string
	conns                             int
	duration                          time.Duration
	seed                              uint64
}

func main() {
	var cfg config
	flag.StringVar(&cfg.base, "base", "http://127.0.0.1:8080", "server base URL")
	flag.StringVar(&cfg.user, "user", "demo.charge1", "user name for the signed-in pages and census saves")
	flag.StringVar(&cfg.password, "password", "", "that user's password")
	flag.StringVar(&cfg.token, "token", "", "API token secret for the ward")
	flag.StringVar(&cfg.ward, "ward", "w7-east", "ward code")
	flag.IntVar(&cfg.conns, "c", 200, "concurrent connections (1–1000)")
	flag.DurationVar(&cfg.duration, "d", 60*time.Second, "duration of the run (1s–10m)")
	flag.Uint64Var(&cfg.seed, "seed", 1, "seed of the request mix")
	hostile := flag.Int("hostile", 0, "instead of the mix, send this many wrong-password sign-ins at once (1–1000) and print their answers")
	flag.Parse()
	if *hostile > 0 {
		hostileSignIns(cfg, min(*hostile, 1000))
		return
	}
	cfg.conns = min(max(cfg.conns, 1), 1000)
	cfg.duration = min(max(cfg.duration, time.Second), 10*time.Minute)
	if cfg.password == "" || cfg.token == "" {
		fmt.Fprintln(os.Stderr, "load: -password and -token are required")
		os.Exit(2)
	}
	lost, err := run(cfg)
	if err != nil {
		fmt.Fprintln(os.Stderr, "load:", err)
		os.Exit(1)
	}
	if lost > 0 {
		os.Exit(1)
	}
}

// shiftKey names one dated shift, as the census form and the API do.
type shiftKey struct{ date, shift string }

func run(cfg config) (lost int, err error) {
	tr := &http.Transport{MaxIdleConnsPerHost: cfg.conns, MaxConnsPerHost: cfg.conns}
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Transport: tr, Jar: jar, Timeout: 30 * time.Second,
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	s := &session{cfg: cfg, c: c}
	if err := s.signIn(); err != nil {
		return 0, err
	}
	form, err := s.censusForm()
	if err != nil {
		return 0, err
	}
	before, err := s.revisions(form)
	if err != nil {
		return 0, err
	}
	pages := []string{"/", "/wards/" + cfg.ward + "/projections", "/wards/" + cfg.ward + "/census"}
	projections, err := s.projectionLinks()
	if err != nil {
		return 0, err
	}
	fmt.Printf("load: %d connections for %s against %s (ward %s; %d shifts × %d dates; %d projection pages)\n",
		cfg.conns, cfg.duration, cfg.base, cfg.ward, len(form.shifts), len(form.dates), len(projections))

	results := make([][]result, cfg.conns)
	acked := make([]map[shiftKey]int, cfg.conns)
	deadline := time.Now().Add(cfg.duration)
	start := time.Now()
	var wg sync.WaitGroup
	for w := range cfg.conns {
		wg.Add(1)
		go func() {
			defer wg.Done()
			rng := rand.New(rand.NewPCG(cfg.seed, uint64(w)))
			acked[w] = map[shiftKey]int{}
			for time.Now().Before(deadline) {
				var r result
				switch p := rng.IntN(100); {
				case p < 35:
					r = s.get("page", pages[rng.IntN(len(pages))], "")
				case p < 60:
					r = s.get("projection", projections[rng.IntN(len(projections))], "")
				case p < 85:
					r = s.get("api", apiPath(cfg.ward, form, rng), cfg.token)
				default:
					var k shiftKey
					r, k = s.save(form, rng)
					if r.acked {
						acked[w][k]++
					}
				}
				results[w] = append(results[w], r)
			}
		}()
	}
	wg.Wait()
	wall := time.Since(start)
	report(results, wall)

	after, err := s.revisions(form)
	if err != nil {
		return 0, fmt.Errorf("after the run: %w", err)
	}
	want := before // each shift's newest revision must have moved on by its acknowledged saves
	total, extra := 0, 0
	for _, a := range acked {
		for k, n := range a {
			want[k] += n
			total += n
		}
	}
	for k := range want {
		lost += max(0, want[k]-after[k])
		extra += max(0, after[k]-want[k])
	}
	fmt.Printf("census saves acknowledged: %d; stored revisions missing: %d (goal 0); stored but not acknowledged: %d\n", total, lost, extra)
	return lost, nil
}

type result struct {
	kind   string
	status int // 0: transport error
	took   time.Duration
	acked  bool
}

type session struct {
	cfg config
	c   *http.Client
}

func (s *session) do(req *http.Request) (*http.Response, []byte, error) {
	res, err := s.c.Do(req)
	if err != nil {
		return nil, nil, err
	}
	defer res.Body.Close()
	body, err := io.ReadAll(io.LimitReader(res.Body, 16<<20))
	return res, body, err
}

func (s *session) get(kind, path, token string) result {
	req, _ := http.NewRequest("GET", s.cfg.base+path, nil)
	if token != "" {
		req.Header.Set("Authorization", "Bearer "+token)
	}
	t0 := time.Now()
	res, _, err := s.do(req)
	r := result{kind: kind, took: time.Since(t0)}
	if err == nil {
		r.status = res.StatusCode
	}
	return r
}

// post sends a same-origin form, as a browser does (the server's
// cross-origin check wants a POST to say so).
func (s *session) post(path string, form url.Values) (*http.Response, error) {
	req, _ := http.NewRequest("POST", s.cfg.base+path, strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	req.Header.Set("Origin", s.cfg.base)
	req.Header.Set("Sec-Fetch-Site", "same-origin")
	res, _, err := s.do(req)
	return res, err
}

func (s *session) signIn() error {
	res, err := s.post("/signin", url.Values{"name": {s.cfg.user}, "password": {s.cfg.password}})
	if err != nil {
		return err
	}
	if res.StatusCode != http.StatusSeeOther || strings.HasPrefix(res.Header.Get("Location"), "/signin") {
		return fmt.Errorf("sign-in failed: status %d Location %q", res.StatusCode, res.Header.Get("Location"))
	}
	return nil
}

// censusForm is what a save needs: the dated shifts the form offers (the
// form takes a shift's ID, the API names it) and the tier fields.
type censusForm struct {
	dates, shifts, tiers []string
	names                map[string]string // shift ID → name
}

var (
	reDateMax = regexp.MustCompile(`name="date"[^>]*max="(\d{4}-\d{2}-\d{2})"|max="(\d{4}-\d{2}-\d{2})"[^>]*name="date"`)
	reOption  = regexp.MustCompile(`<option[^>]*value="([^"]+)"[^>]*>([^<]*?), from `)
	reTier    = regexp.MustCompile(`name="(tier_[^"]+)"`)
)

// daysAhead is how far past the ward's today the census form's date
// window reaches (projector.MaxDaysAhead; the program reads the page, not
// the package, so it can target any build).
const daysAhead = 1

func (s *session) censusForm() (*censusForm, error) {
	body, err := s.page("/wards/" + s.cfg.ward + "/census")
	if err != nil {
		return nil, err
	}
	m := reDateMax.FindStringSubmatch(body)
	if m == nil {
		return nil, errors.New("census form has no date input with a max")
	}
	maxDate, err := time.Parse("2006-01-02", m[1]+m[2])
	if err != nil {
		return nil, err
	}
	f := &censusForm{names: map[string]string{}}
	for _, o := range reOption.FindAllStringSubmatch(body, -1) {
		if !slices.Contains(f.shifts, o[1]) {
			f.shifts = append(f.shifts, o[1])
			f.names[o[1]] = html.UnescapeString(o[2])
		}
	}
	for _, t := range reTier.FindAllStringSubmatch(body, -1) {
		f.tiers = append(f.tiers, t[1])
	}
	if len(f.shifts) == 0 || len(f.tiers) == 0 {
		return nil, fmt.Errorf("census form: %d shifts, %d tier fields", len(f.shifts), len(f.tiers))
	}
	// Today and the two days before, as bench/censussave.
	for d := daysAhead; d <= daysAhead+2; d++ {
		f.dates = append(f.dates, maxDate.AddDate(0, 0, -d).Format("2006-01-02"))
	}
	return f, nil
}

func (s *session) page(path string) (string, error) {
	req, _ := http.NewRequest("GET", s.cfg.base+path, nil)
	res, body, err := s.do(req)
	if err != nil {
		return "", err
	}
	if res.StatusCode != http.StatusOK {
		return "", fmt.Errorf("GET %s: status %d", path, res.StatusCode)
	}
	return string(body), nil
}

var reProjection = regexp.MustCompile(`href="(/wards/[^/"]+/projections/\d+)"`)

func (s *session) projectionLinks() ([]string, error) {
	body, err := s.page("/wards/" + s.cfg.ward + "/projections")
	if err != nil {
		return nil, err
	}
	var out []string
	for _, m := range reProjection.FindAllStringSubmatch(body, -1) {
		out = append(out, m[1])
	}
	if len(out) == 0 {
		return nil, errors.New("no projection link on the shift list")
	}
	return out, nil
}

func (s *session) save(f *censusForm, rng *rand.Rand) (result, shiftKey) {
	date, shift := f.dates[rng.IntN(len(f.dates))], f.shifts[rng.IntN(len(f.shifts))]
	k := shiftKey{date, f.names[shift]}
	form := url.Values{"date": {date}, "shift": {shift}, "confirm_ended": {"1"}}
	for _, t := range f.tiers {
		form.Set(t, fmt.Sprint(rng.IntN(6)))
	}
	t0 := time.Now()
	res, err := s.post("/wards/"+s.cfg.ward+"/census", form)
	r := result{kind: "census save", took: time.Since(t0)}
	if err == nil {
		r.status = res.StatusCode
		r.acked = res.StatusCode == http.StatusSeeOther && strings.Contains(res.Header.Get("Location"), "/projections/")
	}
	return r, k
}

func apiPath(ward string, f *censusForm, rng *rand.Rand) string {
	q := url.Values{"ward": {ward}, "from": {f.dates[len(f.dates)-1]}, "to": {f.dates[0]}}
	if rng.IntN(2) == 0 {
		q.Set("format", "csv")
	}
	return "/api/v1/projections?" + q.Encode()
}

// revisions reads the newest census revision of each dated shift in the
// form's window from the API.
func (s *session) revisions(f *censusForm) (map[shiftKey]int, error) {
	req, _ := http.NewRequest("GET", s.cfg.base+apiPath(s.cfg.ward, f, rand.New(rand.NewPCG(1, 1))), nil)
	req.URL.RawQuery = strings.Replace(req.URL.RawQuery, "format=csv", "format=json", 1)
	req.Header.Set("Authorization", "Bearer "+s.cfg.token)
	res, body, err := s.do(req)
	if err != nil {
		return nil, err
	}
	if res.StatusCode != http.StatusOK {
		return nil, fmt.Errorf("API projections: status %d: %.200s", res.StatusCode, body)
	}
	var doc struct {
		Rows []struct {
			Date     string `json:"date"`
			Shift    string `json:"shift"`
			Revision int    `json:"census_revision"`
		} `json:"rows"`
	}
	if err := json.Unmarshal(body, &doc); err != nil {
		return nil, fmt.Errorf("API projections: %w", err)
	}
	out := map[shiftKey]int{}
	for _, r := range doc.Rows {
		k := shiftKey{r.Date, r.Shift}
		out[k] = max(out[k], r.Revision)
	}
	return out, nil
}

// report prints throughput, latency quantiles per kind of request and
// overall, and every answer that is neither 2xx nor 3xx.
func report(results [][]result, wall time.Duration) {
	byKind := map[string][]time.Duration{}
	var all []time.Duration
	bad := map[string]int{}
	for _, rs := range results {
		for _, r := range rs {
			byKind[r.kind] = append(byKind[r.kind], r.took)
			all = append(all, r.took)
			if r.status < 200 || r.status >= 400 {
				bad[fmt.Sprintf("%s %s", r.kind, statusText(r.status))]++
			}
		}
	}
	fmt.Printf("requests: %d in %.1fs = %.0f req/s\n", len(all), wall.Seconds(), float64(len(all))/wall.Seconds())
	kinds := []string{"page", "projection", "api", "census save"}
	for _, k := range kinds {
		line(k, byKind[k])
	}
	line("all", all)
	nbad := 0
	for _, k := range slices.Sorted(maps.Keys(bad)) {
		fmt.Printf("  non-2xx/3xx: %-28s %d\n", k, bad[k])
		nbad += bad[k]
	}
	fmt.Printf("non-2xx/3xx answers: %d\n", nbad)
}

func statusText(code int) string {
	if code == 0 {
		return "transport error"
	}
	return fmt.Sprint(code)
}

func line(name string, d []time.Duration) {
	if len(d) == 0 {
		return
	}
	slices.Sort(d)
	fmt.Printf("  %-12s n %7d  p50 %8s  p99 %8s  max %8s\n", name, len(d), ms(quantile(d, 0.5)), ms(quantile(d, 0.99)), ms(d[len(d)-1]))
}

// quantile is the nearest-rank quantile of sorted d: the smallest value
// with at least p of the sample at or below it.
func quantile(d []time.Duration, p float64) time.Duration {
	k := int(math.Ceil(float64(len(d))*p)) - 1
	return d[min(max(k, 0), len(d)-1)]
}

func ms(d time.Duration) string { return fmt.Sprintf("%.1fms", float64(d)/float64(time.Millisecond)) }

// hostileSignIns sends n sign-ins with wrong passwords at once, half to
// the given account and half to names that match none, and prints how
// they were answered. The script reads the server's memory meanwhile.
func hostileSignIns(cfg config, n int) {
	c := &http.Client{Transport: &http.Transport{MaxConnsPerHost: n, MaxIdleConnsPerHost: n}, Timeout: 60 * time.Second}
	var mu sync.Mutex
	answers := map[string]int{}
	var wg sync.WaitGroup
	start := time.Now()
	for i := range n {
		wg.Add(1)
		go func() {
			defer wg.Done()
			name := cfg.user
			if i%2 == 1 {
				name = fmt.Sprintf("nobody%d", i)
			}
			res, err := c.PostForm(cfg.base+"/signin", url.Values{"name": {name}, "password": {fmt.Sprintf("wrong-password-%d", i)}})
			code := 0
			if err == nil {
				io.Copy(io.Discard, res.Body)
				res.Body.Close()
				code = res.StatusCode
			}
			mu.Lock()
			answers[statusText(code)]++
			mu.Unlock()
		}()
	}
	wg.Wait()
	fmt.Printf("hostile sign-ins: %d at once, all answered in %.1fs: %v\n", n, time.Since(start).Seconds(), answers)
}
