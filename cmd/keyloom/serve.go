package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os/signal"
	"strings"
	"syscall"
	"time"

	"github.com/keyloom/keyloom"
)

// Limits and timeouts of the HTTP server. Common practice for a small JSON
// API, no source: bodies of a keystroke's context are a few hundred bytes.
const (
	defaultServeAddr   = "127.0.0.1:7341"
	defaultMaxBody     = 64 << 10
	serveHeaderTimeout = 5 * time.Second
	serveReadTimeout   = 10 * time.Second
	serveWriteTimeout  = 10 * time.Second
	serveIdleTimeout   = 60 * time.Second
	serveMaxHeader     = 16 << 10
	shutdownGrace      = 5 * time.Second
)

func runServe(ctx context.Context, e *env, args []string) error {
	fsx := newFlags(e, "serve", "--model M [--user U] [--addr HOST:PORT]",
		"Answers keystrokes over HTTP with JSON, for apps that cannot link the library:\n\n"+
			"  POST /v1/suggest  {\"before\": TEXT}   completions, predictions, correction\n"+
			"  POST /v1/correct  {\"before\": TEXT}   correction of the last word, or null\n"+
			"  POST /v1/learn    {\"text\": TEXT}     teach the user overlay\n"+
			"  POST /v1/forget   {\"phrase\": TEXT}   remove a word or phrase from the overlay\n"+
			"  POST /v1/save     {}                 write the overlay to --user now\n"+
			"  GET  /v1/info                        model description\n"+
			"  GET  /healthz                        liveness\n\n"+
			"POST bodies must be JSON (Content-Type: application/json). It listens on loopback only\n"+
			"unless --public is given (there is no authentication). On SIGINT or SIGTERM it stops\n"+
			"accepting requests, finishes those in progress and saves the overlay to --user.")
	model := fsx.String("model", "", "model file (default: the bundled default model)")
	user := fsx.String("user", "", "user overlay file: loaded at start if it exists, saved on shutdown")
	addr := fsx.String("addr", defaultServeAddr, "address to listen on (port 0 picks a free port)")
	public := fsx.Bool("public", false, "allow a non-loopback --addr")
	k := fsx.Int("k", keyloom.DefaultSuggestions, "number of suggestions (1-32)")
	maxBody := fsx.String("max-body", "64KiB", "largest request body accepted")
	pos, err := parse(fsx, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return fmt.Errorf("%w: unexpected argument %q", errUsage, pos[0])
	}
	limit, err := parseSize(*maxBody)
	if err != nil || limit < 1 {
		return fmt.Errorf("%w: --max-body %q", errUsage, *maxBody)
	}
	notLoopback := fmt.Errorf("%w: --addr %s is not a loopback address; give --public to serve other hosts", errUsage, *addr)
	if !*public && !loopbackHost(*addr) {
		return notLoopback
	}
	ln, err := net.Listen("tcp", *addr)
	if err != nil {
		return err
	}
	// "localhost" could resolve elsewhere: check what was actually bound.
	if tcp, ok := ln.Addr().(*net.TCPAddr); !*public && (!ok || !tcp.IP.IsLoopback()) {
		ln.Close()
		return notLoopback
	}
	eng, err := openUser(ctx, e, *model, *user, false, keyloom.Options{Suggestions: *k})
	if err != nil {
		ln.Close()
		return err
	}
	defer eng.Close()

	h := &serveAPI{eng: eng, maxBody: limit, userPath: *user, anyHost: *public}
	srv := &http.Server{
		Handler:           h.routes(),
		ReadHeaderTimeout: serveHeaderTimeout,
		ReadTimeout:       serveReadTimeout,
		WriteTimeout:      serveWriteTimeout,
		IdleTimeout:       serveIdleTimeout,
		MaxHeaderBytes:    serveMaxHeader,
	}
	ctx, stop := signal.NotifyContext(ctx, syscall.SIGTERM)
	defer stop()
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	fmt.Fprintf(e.stdout, "keyloom serve: listening on http://%s\n", ln.Addr())

	var serveErr error
	select {
	case <-ctx.Done():
	case serveErr = <-served:
	}
	sctx, cancel := context.WithTimeout(context.WithoutCancel(ctx), shutdownGrace)
	defer cancel()
	shutErr := srv.Shutdown(sctx)
	if shutErr != nil {
		srv.Close() // grace period over: drop the connections still open
	}
	if serveErr == nil {
		<-served // Serve returns http.ErrServerClosed once Shutdown starts
	}
	if *user != "" {
		if err := eng.Save(*user); err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "keyloom serve: saved %s (%d n-grams)\n", *user, eng.UserEntries())
	}
	if serveErr != nil && !errors.Is(serveErr, http.ErrServerClosed) {
		return serveErr
	}
	if shutErr != nil {
		return fmt.Errorf("shutdown: %w", shutErr)
	}
	fmt.Fprintln(e.stdout, "keyloom serve: stopped")
	return nil
}

// serveAPI holds what the HTTP handlers share: one engine, safe for
// concurrent use, and the request limits.
type serveAPI struct {
	eng      *keyloom.Engine
	maxBody  int64
	userPath string // where /v1/save writes; "" disables it
	anyHost  bool   // accept any Host header (--public)
}

// routes returns the handler of every endpoint. Wrong methods get 405 with
// an Allow header from the mux; unknown paths get 404.
func (s *serveAPI) routes() http.Handler {
	mux := http.NewServeMux()
	mux.HandleFunc("POST /v1/suggest", s.handleSuggest)
	mux.HandleFunc("POST /v1/correct", s.handleCorrect)
	mux.HandleFunc("POST /v1/learn", s.handleLearn)
	mux.HandleFunc("POST /v1/forget", s.handleForget)
	mux.HandleFunc("POST /v1/save", s.handleSave)
	mux.HandleFunc("GET /v1/info", s.handleInfo)
	mux.HandleFunc("GET /healthz", func(w http.ResponseWriter, r *http.Request) {
		serveJSON(w, http.StatusOK, map[string]string{"status": "ok"})
	})
	return s.guard(mux)
}

// guard refuses requests whose Host is not a loopback name, unless the
// server is public: a web page the user visits could otherwise reach the
// loopback server through a name that it rebinds to 127.0.0.1.
func (s *serveAPI) guard(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if !s.anyHost && !loopbackHost(r.Host) {
			serveError(w, http.StatusForbidden, "host %q is not a loopback name", r.Host)
			return
		}
		next.ServeHTTP(w, r)
	})
}

// loopbackHost reports whether host (a Host header or a listen address,
// port optional) names this machine's loopback interface: "localhost" or an
// address in 127.0.0.0/8 or ::1 (RFC 6890).
func loopbackHost(host string) bool {
	if h, _, err := net.SplitHostPort(host); err == nil {
		host = h
	}
	host = strings.TrimSuffix(strings.TrimPrefix(host, "["), "]")
	if strings.EqualFold(host, "localhost") {
		return true
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

// serveSuggestReq is the body of POST /v1/suggest and /v1/correct.
type serveSuggestReq struct {
	Before *string `json:"before"` // text before the cursor (required)
}

// serveLearnReq is the body of POST /v1/learn.
type serveLearnReq struct {
	Text *string `json:"text"`
}

// serveForgetReq is the body of POST /v1/forget.
type serveForgetReq struct {
	Phrase *string `json:"phrase"`
}

// serveInfo is the answer of GET /v1/info.
type serveInfo struct {
	Order       int    `json:"order"`
	Words       int    `json:"words"`
	NGrams      []int  `json:"ngrams"`
	QuantBits   int    `json:"quant_bits"`
	Bytes       int    `json:"bytes"`
	Corpus      string `json:"corpus"`
	UserEntries int    `json:"user_entries"`
}

func (s *serveAPI) handleSuggest(w http.ResponseWriter, r *http.Request) {
	var req serveSuggestReq
	if !s.decode(w, r, &req) {
		return
	}
	if req.Before == nil {
		serveError(w, http.StatusBadRequest, "missing field \"before\"")
		return
	}
	res, err := s.eng.Suggest(*req.Before)
	if err != nil {
		serveError(w, http.StatusServiceUnavailable, "%v", err)
		return
	}
	serveJSON(w, http.StatusOK, res)
}

// handleCorrect answers the Correction for the last word of "before" (what
// to do when the user finishes it), or null to leave it alone.
func (s *serveAPI) handleCorrect(w http.ResponseWriter, r *http.Request) {
	var req serveSuggestReq
	if !s.decode(w, r, &req) {
		return
	}
	if req.Before == nil {
		serveError(w, http.StatusBadRequest, "missing field \"before\"")
		return
	}
	c, err := s.eng.Correct(*req.Before)
	if err != nil {
		serveError(w, http.StatusServiceUnavailable, "%v", err)
		return
	}
	serveJSON(w, http.StatusOK, c)
}

func (s *serveAPI) handleLearn(w http.ResponseWriter, r *http.Request) {
	var req serveLearnReq
	if !s.decode(w, r, &req) {
		return
	}
	if req.Text == nil {
		serveError(w, http.StatusBadRequest, "missing field \"text\"")
		return
	}
	if err := s.eng.Learn(*req.Text); err != nil {
		serveError(w, http.StatusServiceUnavailable, "%v", err)
		return
	}
	serveJSON(w, http.StatusOK, map[string]int{"user_entries": s.eng.UserEntries()})
}

func (s *serveAPI) handleForget(w http.ResponseWriter, r *http.Request) {
	var req serveForgetReq
	if !s.decode(w, r, &req) {
		return
	}
	if req.Phrase == nil {
		serveError(w, http.StatusBadRequest, "missing field \"phrase\"")
		return
	}
	n, err := s.eng.Forget(*req.Phrase)
	if err != nil {
		serveError(w, http.StatusServiceUnavailable, "%v", err)
		return
	}
	serveJSON(w, http.StatusOK, map[string]int{"removed": n})
}

func (s *serveAPI) handleSave(w http.ResponseWriter, r *http.Request) {
	var req struct{}
	if !s.decode(w, r, &req) {
		return
	}
	if s.userPath == "" {
		serveError(w, http.StatusConflict, "the server was started without --user")
		return
	}
	if err := s.eng.Save(s.userPath); err != nil {
		serveError(w, http.StatusInternalServerError, "%v", err)
		return
	}
	serveJSON(w, http.StatusOK, map[string]int{"user_entries": s.eng.UserEntries()})
}

func (s *serveAPI) handleInfo(w http.ResponseWriter, r *http.Request) {
	i := s.eng.Info()
	serveJSON(w, http.StatusOK, serveInfo{i.Order, i.Words, i.NGrams, i.QuantBits, i.Bytes, i.Corpus, s.eng.UserEntries()})
}

// decode reads one JSON object of at most s.maxBody bytes into v. On failure
// it answers 415 (not declared as JSON), 413 (too large) or 400 (malformed,
// unknown field, trailing data) and returns false. Requiring the JSON
// Content-Type keeps web pages from posting to the server with plain forms,
// which browsers send cross-site without asking the server first.
func (s *serveAPI) decode(w http.ResponseWriter, r *http.Request, v any) bool {
	ct := strings.TrimSpace(strings.ToLower(strings.Split(r.Header.Get("Content-Type"), ";")[0]))
	if ct != "application/json" {
		serveError(w, http.StatusUnsupportedMediaType, "Content-Type must be application/json")
		return false
	}
	body := http.MaxBytesReader(w, r.Body, s.maxBody)
	dec := json.NewDecoder(body)
	dec.DisallowUnknownFields()
	err := dec.Decode(v)
	if err == nil {
		if _, terr := dec.Token(); terr != io.EOF {
			err = terr
			if err == nil {
				err = errors.New("data after the JSON object")
			}
		}
	}
	if err == nil {
		return true
	}
	var tooBig *http.MaxBytesError
	if errors.As(err, &tooBig) {
		serveError(w, http.StatusRequestEntityTooLarge, "request body larger than %d bytes", tooBig.Limit)
		return false
	}
	serveError(w, http.StatusBadRequest, "bad JSON body: %v", err)
	return false
}

// serveJSON answers with v as JSON.
func serveJSON(w http.ResponseWriter, status int, v any) {
	b, err := json.Marshal(v)
	if err != nil {
		status, b = http.StatusInternalServerError, []byte(`{"error":"encoding the answer failed"}`)
	}
	h := w.Header()
	h.Set("Content-Type", "application/json")
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	w.Write(append(b, '\n'))
}

// serveError answers with {"error": message}.
func serveError(w http.ResponseWriter, status int, format string, args ...any) {
	serveJSON(w, status, map[string]string{"error": fmt.Sprintf(format, args...)})
}
