package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/keyloom/keyloom"
)

const (
	serveModel  = "../../testdata/models/demo-v1.klm"
	serveInputs = "../../testdata/routes/inputs.txt"
)

// newServeTest starts the handlers on a real loopback listener.
func newServeTest(t testing.TB, userPath string) (*httptest.Server, *keyloom.Engine) {
	t.Helper()
	eng, err := keyloom.Open(serveModel, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	api := &serveAPI{eng: eng, maxBody: defaultMaxBody, userPath: userPath}
	ts := httptest.NewServer(api.routes())
	t.Cleanup(func() {
		ts.Close()
		eng.Close()
	})
	return ts, eng
}

// post sends a JSON body and returns the status and body.
func post(t testing.TB, c *http.Client, url, body string) (int, []byte) {
	t.Helper()
	resp, err := c.Post(url, "application/json", strings.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		t.Fatal(err)
	}
	return resp.StatusCode, b
}

// suggestOver asks the server for the answer to before.
func suggestOver(t testing.TB, c *http.Client, base, before string) keyloom.Result {
	t.Helper()
	body, _ := json.Marshal(map[string]string{"before": before})
	code, b := post(t, c, base+"/v1/suggest", string(body))
	if code != http.StatusOK {
		t.Fatalf("suggest %q: status %d: %s", before, code, b)
	}
	var res keyloom.Result
	if err := json.Unmarshal(b, &res); err != nil {
		t.Fatalf("suggest %q: %v: %s", before, err, b)
	}
	return res
}

func words(list []keyloom.Suggestion) []string {
	var w []string
	for _, s := range list {
		w = append(w, s.Word)
	}
	return w
}

// TestServeEndpoints checks every endpoint and the error statuses. Status
// codes are those RFC 9110 assigns: 400 (section 15.5.1), 403 (15.5.4),
// 404 (15.5.5), 405 with an Allow header (15.5.6), 409 (15.5.10),
// 413 Content Too Large (15.5.14), 415 (15.5.16).
func TestServeEndpoints(t *testing.T) {
	ts, _ := newServeTest(t, "")
	huge := `{"before":"` + strings.Repeat("a", defaultMaxBody) + `"}`
	type result struct {
		Error       string `json:"error"`
		Status      string `json:"status"`
		UserEntries *int   `json:"user_entries"`
		Removed     *int   `json:"removed"`
		Order       int    `json:"order"`
		Words       int    `json:"words"`
		keyloom.Result
		keyloom.Correction
	}
	tests := []struct {
		name, method, path, ctype, host, body string
		want                                  int
		check                                 func(t *testing.T, r result, h http.Header)
	}{
		{name: "suggest/predictions", method: "POST", path: "/v1/suggest", body: `{"before":"see you at the "}`, want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				if r.Prefix != "" || len(r.Predictions) == 0 || len(r.Completions) != 0 {
					t.Errorf("after a space: prefix %q, predictions %v, completions %v; want predictions only", r.Prefix, r.Predictions, r.Completions)
				}
			}},
		{name: "suggest/completions", method: "POST", path: "/v1/suggest", body: `{"before":"see you at the o"}`, want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				if r.Prefix != "o" || len(r.Completions) == 0 {
					t.Fatalf("prefix %q, completions %v; want completions of \"o\"", r.Prefix, r.Completions)
				}
				for _, s := range r.Completions {
					if !strings.HasPrefix(strings.ToLower(s.Word), "o") {
						t.Errorf("completion %q does not start with the typed prefix", s.Word)
					}
				}
			}},
		// "agian" -> "again" is a pair of the Wikipedia list of common
		// misspellings (corpora/misspellings-dev.tsv).
		{name: "correct/misspelling", method: "POST", path: "/v1/correct", body: `{"before":"we can meet agian "}`, want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				if r.Typed != "agian" || r.Replacement != "again" {
					t.Errorf("correct agian: typed %q, replacement %q; want agian -> again", r.Typed, r.Replacement)
				}
			}},
		{name: "correct/missing-field", method: "POST", path: "/v1/correct", body: `{"text":"agian "}`, want: 400},
		{name: "info", method: "GET", path: "/v1/info", want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				// testdata/models/README.md: the demo model was built with order 3.
				if r.Order != 3 || r.Words == 0 {
					t.Errorf("info: order %d, words %d; want order 3 and some words", r.Order, r.Words)
				}
			}},
		{name: "healthz", method: "GET", path: "/healthz", want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				if r.Status != "ok" {
					t.Errorf("status %q", r.Status)
				}
			}},
		{name: "learn", method: "POST", path: "/v1/learn", body: `{"text":"the shed opens at six"}`, want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				if r.UserEntries == nil || *r.UserEntries == 0 {
					t.Errorf("learn: user_entries %v, want > 0", r.UserEntries)
				}
			}},
		{name: "forget", method: "POST", path: "/v1/forget", body: `{"phrase":"opens at six"}`, want: 200,
			check: func(t *testing.T, r result, _ http.Header) {
				if r.Removed == nil || *r.Removed == 0 {
					t.Errorf("forget after learn: removed %v, want > 0", r.Removed)
				}
			}},
		{name: "save/without-user", method: "POST", path: "/v1/save", body: `{}`, want: 409},
		{name: "oversize", method: "POST", path: "/v1/suggest", body: huge, want: 413},
		{name: "bad-json", method: "POST", path: "/v1/suggest", body: `{"before": "see`, want: 400},
		{name: "not-an-object", method: "POST", path: "/v1/suggest", body: `["see"]`, want: 400},
		{name: "unknown-field", method: "POST", path: "/v1/suggest", body: `{"before":"a","cursor":3}`, want: 400},
		{name: "missing-field", method: "POST", path: "/v1/suggest", body: `{}`, want: 400},
		{name: "trailing-data", method: "POST", path: "/v1/suggest", body: `{"before":"a"} {"before":"b"}`, want: 400},
		{name: "learn/missing-text", method: "POST", path: "/v1/learn", body: `{"txt":"a"}`, want: 400},
		{name: "wrong-method/get-suggest", method: "GET", path: "/v1/suggest", want: 405,
			check: func(t *testing.T, _ result, h http.Header) {
				if !strings.Contains(h.Get("Allow"), "POST") {
					t.Errorf("405 without Allow: POST (RFC 9110 section 15.5.6): %q", h.Get("Allow"))
				}
			}},
		{name: "wrong-method/post-info", method: "POST", path: "/v1/info", body: `{}`, want: 405},
		{name: "wrong-method/delete-learn", method: "DELETE", path: "/v1/learn", want: 405},
		{name: "form-post", method: "POST", path: "/v1/learn", ctype: "application/x-www-form-urlencoded", body: `text=hello`, want: 415},
		{name: "foreign-host", method: "GET", path: "/v1/info", host: "rebound.example:7341", want: 403},
		{name: "unknown-path", method: "GET", path: "/v2/suggest", want: 404},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			req, err := http.NewRequest(tt.method, ts.URL+tt.path, strings.NewReader(tt.body))
			if err != nil {
				t.Fatal(err)
			}
			if tt.body != "" {
				ct := tt.ctype
				if ct == "" {
					ct = "application/json; charset=utf-8"
				}
				req.Header.Set("Content-Type", ct)
			}
			if tt.host != "" {
				req.Host = tt.host
			}
			resp, err := ts.Client().Do(req)
			if err != nil {
				t.Fatal(err)
			}
			defer resp.Body.Close()
			b, _ := io.ReadAll(resp.Body)
			if resp.StatusCode != tt.want {
				t.Fatalf("%s %s = %d, want %d: %s", tt.method, tt.path, resp.StatusCode, tt.want, b)
			}
			var r result
			if tt.want != 405 && tt.want != 404 {
				if ct := resp.Header.Get("Content-Type"); ct != "application/json" {
					t.Errorf("Content-Type %q", ct)
				}
				if err := json.Unmarshal(b, &r); err != nil {
					t.Fatalf("answer is not JSON: %v: %s", err, b)
				}
				if (tt.want >= 400) != (r.Error != "") {
					t.Errorf("status %d with error %q", tt.want, r.Error)
				}
			}
			if tt.check != nil {
				tt.check(t, r, resp.Header)
			}
		})
	}
}

// readRouteInputs returns the shared cross-route input table.
func readRouteInputs(t testing.TB) []string {
	t.Helper()
	f, err := os.Open(serveInputs)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var in []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		var s string
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			t.Fatalf("%s line %d: %v", serveInputs, len(in)+1, err)
		}
		in = append(in, s)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(in) == 0 {
		t.Fatalf("%s is empty", serveInputs)
	}
	return in
}

// TestServeInputTableMatchesFacade compares the server's answer for every
// line of the shared input table with the Go facade's answer computed now,
// byte for byte (same JSON encoding of the same Result).
func TestServeInputTableMatchesFacade(t *testing.T) {
	ts, _ := newServeTest(t, "")
	ref, err := keyloom.Open(serveModel, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer ref.Close()
	for _, in := range readRouteInputs(t) {
		t.Run(fmt.Sprintf("%q", in), func(t *testing.T) {
			res, err := ref.Suggest(in)
			if err != nil {
				t.Fatal(err)
			}
			want, err := json.Marshal(res)
			if err != nil {
				t.Fatal(err)
			}
			body, _ := json.Marshal(map[string]string{"before": in})
			code, got := post(t, ts.Client(), ts.URL+"/v1/suggest", string(body))
			if code != 200 || !bytes.Equal(bytes.TrimSpace(got), want) {
				t.Errorf("POST /v1/suggest %q = %d %s, want 200 %s", in, code, got, want)
			}
			corr, err := ref.Correct(in)
			if err != nil {
				t.Fatal(err)
			}
			want, err = json.Marshal(corr)
			if err != nil {
				t.Fatal(err)
			}
			code, got = post(t, ts.Client(), ts.URL+"/v1/correct", string(body))
			if code != 200 || !bytes.Equal(bytes.TrimSpace(got), want) {
				t.Errorf("POST /v1/correct %q = %d %s, want 200 %s", in, code, got, want)
			}
		})
	}
}

// TestServeCorrectLeavesCorrectWords checks that a correctly spelled word
// gets the answer null ("the" and "shed" are words of the demo corpus).
func TestServeCorrectLeavesCorrectWords(t *testing.T) {
	ts, _ := newServeTest(t, "")
	for _, in := range []string{"see you at the ", "in the shed "} {
		code, got := post(t, ts.Client(), ts.URL+"/v1/correct", fmt.Sprintf(`{"before":%q}`, in))
		if code != 200 || string(bytes.TrimSpace(got)) != "null" {
			t.Errorf("POST /v1/correct %q = %d %s, want 200 null", in, code, got)
		}
	}
}

// TestServeLearnForget checks that an invented word becomes a completion
// after it is learned through the server and disappears when forgotten.
func TestServeLearnForget(t *testing.T) {
	ts, _ := newServeTest(t, "")
	c := ts.Client()
	const word, typed = "quorvex", "meet me at the quorv"
	if w := words(suggestOver(t, c, ts.URL, typed).Completions); slices.Contains(w, word) {
		t.Fatalf("%q completed before learning: %v", word, w)
	}
	for range 3 {
		if code, b := post(t, c, ts.URL+"/v1/learn", `{"text":"we meet at the quorvex on Friday"}`); code != 200 {
			t.Fatalf("learn: %d %s", code, b)
		}
	}
	if w := words(suggestOver(t, c, ts.URL, typed).Completions); !slices.Contains(w, word) {
		t.Fatalf("Suggest(%q) = %v after learning, want %q among them", typed, w, word)
	}
	if code, b := post(t, c, ts.URL+"/v1/forget", `{"phrase":"quorvex"}`); code != 200 {
		t.Fatalf("forget: %d %s", code, b)
	}
	if w := words(suggestOver(t, c, ts.URL, typed).Completions); slices.Contains(w, word) {
		t.Errorf("Suggest(%q) = %v after forgetting %q", typed, w, word)
	}
}

// syncBuffer is a bytes.Buffer safe for the server goroutine and the test.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

var listenLine = regexp.MustCompile(`listening on (http://127\.0\.0\.1:\d+)`)

// startServe runs `keyloom serve` in a goroutine and returns its base URL,
// a function that stops it (as SIGINT does) and returns its error, and its output.
func startServe(t *testing.T, args ...string) (string, func() error, *syncBuffer) {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	out := &syncBuffer{}
	e := &env{stdin: strings.NewReader(""), stdout: out, stderr: out, cacheDir: t.TempDir()}
	done := make(chan error, 1)
	go func() { done <- runServe(ctx, e, args) }()
	deadline := time.Now().Add(10 * time.Second)
	for {
		if m := listenLine.FindStringSubmatch(out.String()); m != nil {
			var once sync.Once
			var err error
			stop := func() error {
				once.Do(func() {
					cancel()
					select {
					case err = <-done:
					case <-time.After(10 * time.Second):
						err = errors.New("serve did not stop within 10s of cancel")
					}
				})
				return err
			}
			t.Cleanup(func() { stop() })
			return m[1], stop, out
		}
		select {
		case err := <-done:
			cancel()
			t.Fatalf("serve exited before listening: %v\n%s", err, out)
		case <-time.After(10 * time.Millisecond):
		}
		if time.Now().After(deadline) {
			cancel()
			t.Fatalf("serve did not print its address:\n%s", out)
		}
	}
}

// TestServeRunSavesOverlay runs the command end to end on 127.0.0.1:0:
// learning over HTTP, /v1/save, and the overlay saved again on shutdown.
func TestServeRunSavesOverlay(t *testing.T) {
	user := filepath.Join(t.TempDir(), "me.overlay")
	base, stop, out := startServe(t, "--model", serveModel, "--user", user, "--addr", "127.0.0.1:0")
	c := &http.Client{Timeout: 10 * time.Second}
	for range 3 {
		if code, b := post(t, c, base+"/v1/learn", `{"text":"pack the zintaroo tonight"}`); code != 200 {
			t.Fatalf("learn: %d %s", code, b)
		}
	}
	if code, b := post(t, c, base+"/v1/save", `{}`); code != 200 {
		t.Fatalf("save: %d %s", code, b)
	}
	if _, err := os.Stat(user); err != nil {
		t.Fatalf("/v1/save did not write %s: %v", user, err)
	}
	if err := os.Remove(user); err != nil {
		t.Fatal(err)
	}
	if code, b := post(t, c, base+"/v1/learn", `{"text":"pack the zintaroo tonight"}`); code != 200 {
		t.Fatalf("learn: %d %s", code, b)
	}
	if err := stop(); err != nil {
		t.Fatalf("serve: %v\n%s", err, out)
	}
	if !strings.Contains(out.String(), "stopped") {
		t.Errorf("no clean stop in output:\n%s", out)
	}
	eng, err := keyloom.Open(serveModel, keyloom.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer eng.Close()
	if err := eng.OpenOverlay(user); err != nil {
		t.Fatalf("overlay not saved on shutdown: %v", err)
	}
	res, err := eng.Suggest("the zinta")
	if err != nil {
		t.Fatal(err)
	}
	if w := words(res.Completions); !slices.Contains(w, "zintaroo") {
		t.Errorf("saved overlay: Suggest(%q) = %v, want zintaroo", "the zinta", w)
	}
	if _, err := c.Get(base + "/healthz"); err == nil {
		t.Errorf("server still answers after shutdown")
	}
}

// TestServeFlags checks --help and the refusals that need no listener
// (a non-loopback address without --public; RFC 6890: 127.0.0.0/8 is loopback).
func TestServeFlags(t *testing.T) {
	tests := []struct {
		name string
		args []string
		code int
		out  string
	}{
		{"help", []string{"serve", "--help"}, 0, "usage: keyloom serve"},
		{"wildcard-address", []string{"serve", "--model", serveModel, "--addr", "0.0.0.0:0"}, 2, "loopback"},
		{"empty-host", []string{"serve", "--model", serveModel, "--addr", ":0"}, 2, "loopback"},
		{"other-host", []string{"serve", "--model", serveModel, "--addr", "192.0.2.1:0"}, 2, "loopback"},
		{"bad-max-body", []string{"serve", "--model", serveModel, "--max-body", "lots"}, 2, "max-body"},
		{"stray-argument", []string{"serve", "--model", serveModel, "extra"}, 2, "unexpected"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
			defer cancel()
			var out, errb bytes.Buffer
			e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, cacheDir: t.TempDir()}
			code := run(ctx, e, tt.args)
			if code != tt.code || !strings.Contains(out.String()+errb.String(), tt.out) {
				t.Errorf("keyloom %v = %d, output %q %q; want %d containing %q", tt.args, code, out.String(), errb.String(), tt.code, tt.out)
			}
		})
	}
}

// loadStats sums up one load run.
type loadStats struct {
	requests, errors int
	elapsed          time.Duration
	p99              time.Duration
}

// loadRun has clients goroutines post suggest requests, cycling through
// bodies, until each has sent perClient requests or limit has passed.
func loadRun(url string, clients, perClient int, limit time.Duration, bodies [][]byte) loadStats {
	tr := &http.Transport{MaxIdleConns: clients, MaxIdleConnsPerHost: clients}
	defer tr.CloseIdleConnections()
	c := &http.Client{Transport: tr, Timeout: 5 * time.Second}
	lat := make([][]time.Duration, clients)
	errs := make([]int, clients)
	start := time.Now()
	deadline := start.Add(limit)
	var wg sync.WaitGroup
	for i := range clients {
		wg.Go(func() {
			for j := 0; j < perClient && time.Now().Before(deadline); j++ {
				t0 := time.Now()
				resp, err := c.Post(url, "application/json", bytes.NewReader(bodies[(i+j)%len(bodies)]))
				if err != nil {
					errs[i]++
					continue
				}
				_, err = io.Copy(io.Discard, resp.Body)
				resp.Body.Close()
				if err != nil || resp.StatusCode != http.StatusOK {
					errs[i]++
					continue
				}
				lat[i] = append(lat[i], time.Since(t0))
			}
		})
	}
	wg.Wait()
	st := loadStats{elapsed: time.Since(start)}
	all := slices.Concat(lat...)
	slices.Sort(all)
	st.requests = len(all)
	for _, e := range errs {
		st.errors += e
		st.requests += e
	}
	if len(all) > 0 {
		// nearest-rank percentile: the ceil(0.99·n)-th smallest value (the
		// textbook nearest-rank definition; stated from memory)
		st.p99 = all[(len(all)*99+99)/100-1]
	}
	return st
}

func suggestBodies(t testing.TB) [][]byte {
	t.Helper()
	var bodies [][]byte
	for _, in := range readRouteInputs(t) {
		b, _ := json.Marshal(map[string]string{"before": in})
		bodies = append(bodies, b)
	}
	return bodies
}

// TestServeLoad runs a bounded load on loopback (4 clients × 2,000 requests
// or 5 s, whichever comes first; 200 each with -short) and requires zero errors.
func TestServeLoad(t *testing.T) {
	ts, _ := newServeTest(t, "")
	per := 2000
	if testing.Short() {
		per = 200
	}
	st := loadRun(ts.URL+"/v1/suggest", 4, per, 5*time.Second, suggestBodies(t))
	if st.errors != 0 || st.requests == 0 {
		t.Fatalf("load: %d requests, %d errors", st.requests, st.errors)
	}
	t.Logf("load: %d requests in %v: %.0f req/s, p99 %v", st.requests, st.elapsed.Round(time.Millisecond),
		float64(st.requests)/st.elapsed.Seconds(), st.p99)
}

// BenchmarkServeSuggest measures POST /v1/suggest over loopback with 4
// concurrent clients: one op is a round of 4 × 250 requests.
func BenchmarkServeSuggest(b *testing.B) {
	ts, _ := newServeTest(b, "")
	bodies := suggestBodies(b)
	b.ReportAllocs()
	var total loadStats
	var p99 []time.Duration
	for b.Loop() {
		st := loadRun(ts.URL+"/v1/suggest", 4, 250, 5*time.Second, bodies)
		total.requests += st.requests
		total.errors += st.errors
		total.elapsed += st.elapsed
		p99 = append(p99, st.p99)
	}
	if total.errors != 0 {
		b.Fatalf("%d errors in %d requests", total.errors, total.requests)
	}
	slices.Sort(p99)
	b.ReportMetric(float64(total.requests)/total.elapsed.Seconds(), "req/s")
	b.ReportMetric(float64(p99[len(p99)/2].Microseconds()), "p99-µs")
}
