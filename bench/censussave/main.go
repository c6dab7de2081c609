// Command censussave measures how long saving a census takes through the
// web form of a running wardload server, projection included: it signs in,
// reads the census form of a ward for its shifts and tier fields, then
// posts n census entries one after another and prints latency quantiles.
//
// It is a benchmark driver for bench/serve.sh, not a test; it talks only to
// the address it is given (loopback in the script).
//
//	go run ./bench/censussave -base http://127.0.0.1:8089 -user demo.charge1 -password … -ward w7-east -n 200
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"os"
	"slices"
	"strings"
	"time"

	"golang.org/x/net/html"

	"wardload/internal/projector"
)

func main() {
	base := flag.String("base", "http://127.0.0.1:8080", "server base URL")
	user := flag.String("user", "demo.charge1", "user name")
	pw := flag.String("password", "", "password")
	ward := flag.String("ward", "w7-east", "ward code")
	n := flag.Int("n", 200, "census saves to time (at most 5000)")
	target := flag.Duration("target", 100*time.Millisecond, "p99 target")
	flag.Parse()
	if err := run(*base, *user, *pw, *ward, min(max(*n, 1), 5000), *target); err != nil {
		fmt.Fprintln(os.Stderr, "censussave:", err)
		os.Exit(1)
	}
}

func run(base, user, pw, ward string, n int, target time.Duration) error {
	jar, _ := cookiejar.New(nil)
	c := &http.Client{Jar: jar, Timeout: 30 * time.Second,
		CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	// The server's cross-origin check wants a same-origin POST to say so.
	postForm := func(path string, form url.Values) (*http.Response, error) {
		req, _ := http.NewRequest("POST", base+path, strings.NewReader(form.Encode()))
		req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		req.Header.Set("Origin", base)
		req.Header.Set("Sec-Fetch-Site", "same-origin")
		res, err := c.Do(req)
		if err != nil {
			return nil, err
		}
		io.Copy(io.Discard, res.Body)
		res.Body.Close()
		return res, nil
	}
	res, err := postForm("/signin", url.Values{"name": {user}, "password": {pw}})
	if err != nil {
		return err
	}
	if res.StatusCode != http.StatusSeeOther || strings.HasPrefix(res.Header.Get("Location"), "/signin") {
		return fmt.Errorf("sign-in failed: status %d Location %q", res.StatusCode, res.Header.Get("Location"))
	}

	censusPath := "/wards/" + ward + "/census"
	doc, err := getHTML(c, base+censusPath)
	if err != nil {
		return err
	}
	dateIn := find(doc, func(n *html.Node) bool { return n.Data == "input" && attr(n, "name") == "date" })
	if len(dateIn) == 0 {
		return errors.New("census form has no date input")
	}
	maxDate, err := time.Parse("2006-01-02", attr(dateIn[0], "max"))
	if err != nil {
		return fmt.Errorf("census form: date max: %v", err)
	}
	var shifts []string
	for _, o := range find(doc, func(n *html.Node) bool { return n.Data == "option" && attr(n, "value") != "" }) {
		shifts = append(shifts, attr(o, "value"))
	}
	if len(shifts) == 0 {
		return errors.New("census form offers no shifts")
	}
	// The window ends MaxDaysAhead days after the ward's today: save for
	// today and the two days before, across every shift.
	var dates []string
	for d := projector.MaxDaysAhead; d <= projector.MaxDaysAhead+2; d++ {
		dates = append(dates, maxDate.AddDate(0, 0, -d).Format("2006-01-02"))
	}
	q := url.Values{"date": {dates[0]}, "shift": {shifts[0]}}
	doc, err = getHTML(c, base+censusPath+"?"+q.Encode())
	if err != nil {
		return err
	}
	var tiers []string
	for _, in := range find(doc, func(n *html.Node) bool {
		return n.Data == "input" && strings.HasPrefix(attr(n, "name"), "tier_")
	}) {
		tiers = append(tiers, attr(in, "name"))
	}
	if len(tiers) == 0 {
		return errors.New("census form has no tier fields")
	}

	rng := rand.New(rand.NewPCG(1, 2)) // fixed seed: the same counts every run
	took := make([]time.Duration, 0, n)
	start := time.Now()
	for i := range n {
		form := url.Values{"date": {dates[i%len(dates)]}, "shift": {shifts[(i/len(dates))%len(shifts)]}}
		for _, t := range tiers {
			form.Set(t, fmt.Sprint(rng.IntN(6)))
		}
		t0 := time.Now()
		res, err := postForm(censusPath, form)
		d := time.Since(t0)
		if err != nil {
			return err
		}
		if res.StatusCode != http.StatusSeeOther || !strings.Contains(res.Header.Get("Location"), "/projections/") {
			return fmt.Errorf("save %d: status %d Location %q (want 303 to the projection)", i+1, res.StatusCode, res.Header.Get("Location"))
		}
		took = append(took, d)
	}
	wall := time.Since(start)
	slices.Sort(took)
	q99 := quantile(took, 0.99)
	fmt.Printf("census saves: %d sequential, %d shifts × %d dates, %d tiers, wall %.1fs\n", n, len(shifts), len(dates), len(tiers), wall.Seconds())
	fmt.Printf("census save latency: p50 %s  p90 %s  p99 %s  max %s\n",
		ms(quantile(took, 0.5)), ms(quantile(took, 0.9)), ms(q99), ms(took[len(took)-1]))
	verdict := "PASS"
	if q99 > target {
		verdict = "FAIL"
	}
	fmt.Printf("census save p99 %s (target <= %s): %s\n", ms(q99), ms(target), verdict)
	return nil
}

// quantile is the nearest-rank quantile of sorted d: the smallest value
// with at least p of the sample at or below it.
func quantile(d []time.Duration, p float64) time.Duration {
	k := int(math.Ceil(float64(len(d))*p)) - 1
	return d[min(max(k, 0), len(d)-1)]
}

func ms(d time.Duration) string { return fmt.Sprintf("%.1f ms", float64(d)/float64(time.Millisecond)) }

func getHTML(c *http.Client, u string) (*html.Node, error) {
	res, err := c.Get(u)
	if err != nil {
		return nil, err
	}
	defer res.Body.Close()
	if res.StatusCode != http.StatusOK {
		return nil, fmt.Errorf("GET %s: status %d", u, res.StatusCode)
	}
	return html.Parse(res.Body)
}

func find(n *html.Node, match func(*html.Node) bool) []*html.Node {
	var out []*html.Node
	if n.Type == html.ElementNode && match(n) {
		out = append(out, n)
	}
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		out = append(out, find(c, match)...)
	}
	return out
}

func attr(n *html.Node, key string) string {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val
		}
	}
	return ""
}
