package labelserver

import (
	"crypto/subtle"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"net/http"
	"os"
	"slices"
	"sync"
	"time"

	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
)

// Config is what a labeling server serves.
type Config struct {
	// Folder is the draw folder, opened (and checked against the plan)
	// by drawfolder.Open; Classes are the plan's classes, in plan order.
	Folder  *drawfolder.Folder
	Classes []string
	// Trail is the draw's trail, open for appending; the server appends
	// every label event to it and owns it from here on.
	Trail *labeltrail.Log
	// Media is the folder of the images a shown column may name ("" for
	// none).
	Media string
	// Hosts are the Host headers the server answers (e.g.
	// "127.0.0.1:8080"); empty: any.
	Hosts []string
	// Now is the clock of the label events; Random the source of the
	// access tokens, session ids and CSRF tokens (crypto/rand in use).
	Now    func() time.Time
	Random io.Reader
}

// Sheet is one worksheet the server serves.
type Sheet struct {
	// Name is the worksheet's file name in the draw folder.
	Name string
	// Title says who labels it, for the page and the command's output.
	Title string
	// Items is the number of items a labeler goes through (the sample
	// items; spares are added as they are assigned).
	Items int
	// Path is the worksheet's address on the server: /s/TOKEN/.
	Path string
}

// sheet is a worksheet served under one token.
type sheet struct {
	Sheet
	token string
	rows  map[int]drawfolder.WorksheetRow
	order []int // items in worksheet order
	// spares is the spare rule (nil for the second worksheet, which has
	// no spares).
	spares *spareRule
	// media are the shown values that name an image file of the media
	// folder (mediaFiles).
	media map[string]bool
}

// Server is a labeling server. Its handler is safe for concurrent use:
// label events are appended one at a time, in the order they arrive.
type Server struct {
	cfg    Config
	sheets []*sheet
	byTok  map[string]*sheet
	root   *os.Root // the media folder; nil without one
	mu     sync.Mutex
	sess   sessions
	mux    *http.ServeMux
}

// Titles of the worksheets.
const (
	FirstTitle  = "first labels"
	SecondTitle = "second labels, independent"
)

// New builds the server: one random token per worksheet of the trail's
// state (worksheet.csv, and worksheet-second.csv with double labeling).
func New(c Config) (*Server, error) {
	if c.Folder == nil || c.Trail == nil || c.Now == nil || c.Random == nil {
		return nil, errors.New("labelserver: Folder, Trail, Now and Random are required")
	}
	s := &Server{cfg: c, byTok: map[string]*sheet{}, sess: sessions{byID: map[string]*session{}}}
	if c.Media != "" {
		root, err := os.OpenRoot(c.Media)
		if err != nil {
			return nil, err
		}
		s.root = root
	}
	st := c.Trail.State()
	for _, name := range st.Sheets() {
		tok, err := randomHex(c.Random, 16)
		if err != nil {
			return nil, err
		}
		if s.byTok[tok] != nil {
			return nil, errors.New("labelserver: the random source gave one access token twice")
		}
		rows := st.Worksheet(name)
		sh := &sheet{token: tok, rows: map[int]drawfolder.WorksheetRow{}, media: mediaFiles(s.root, rows)}
		sh.Name, sh.Path = name, "/s/"+tok+"/"
		for _, r := range rows {
			sh.rows[r.Item] = r
			sh.order = append(sh.order, r.Item)
		}
		sh.Title, sh.Items = SecondTitle, len(sh.order)
		if name == drawfolder.WorksheetFile {
			sh.Title = FirstTitle
			sh.spares = newSpareRule(c.Folder.Ledger, c.Folder.StratumIndex)
			sh.Items = len(sh.spares.sequence(assignment{}))
		}
		s.sheets = append(s.sheets, sh)
		s.byTok[tok] = sh
	}
	s.mux = s.routes()
	return s, nil
}

// Sheets are the worksheets served, worksheet.csv first.
func (s *Server) Sheets() []Sheet {
	out := make([]Sheet, len(s.sheets))
	for i, sh := range s.sheets {
		out[i] = sh.Sheet
	}
	return out
}

// Handler is the server's HTTP handler.
func (s *Server) Handler() http.Handler { return http.HandlerFunc(s.serve) }

// Close closes the media folder (the trail is the caller's to close).
func (s *Server) Close() error {
	if s.root != nil {
		return s.root.Close()
	}
	return nil
}

// serve sets the security headers of every response, checks the Host
// header and routes.
func (s *Server) serve(w http.ResponseWriter, r *http.Request) {
	h := w.Header()
	h.Set("Content-Security-Policy", contentSecurityPolicy)
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("X-Frame-Options", "DENY")
	h.Set("Referrer-Policy", "no-referrer")
	h.Set("Cross-Origin-Opener-Policy", "same-origin")
	h.Set("Cross-Origin-Resource-Policy", "same-origin")
	h.Set("Cache-Control", "no-store")
	if len(s.cfg.Hosts) > 0 && !slices.Contains(s.cfg.Hosts, r.Host) {
		deny(w, http.StatusForbidden, "unknown host")
		return
	}
	s.mux.ServeHTTP(w, r)
}

// contentSecurityPolicy allows nothing but the server's own scripts,
// styles, images and requests, and no framing.
const contentSecurityPolicy = "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; connect-src 'self'; " +
	"base-uri 'none'; form-action 'none'; frame-ancestors 'none'"

// sheetOf finds the worksheet of the request's token, comparing in
// constant time.
func (s *Server) sheetOf(r *http.Request) *sheet {
	tok := r.PathValue("token")
	var found *sheet
	for _, sh := range s.sheets {
		if subtle.ConstantTimeCompare([]byte(tok), []byte(sh.token)) == 1 {
			found = sh
		}
	}
	return found
}

// randomHex is n random bytes in hex.
func randomHex(random io.Reader, n int) (string, error) {
	b := make([]byte, n)
	if _, err := io.ReadFull(random, b); err != nil {
		return "", fmt.Errorf("labelserver: reading random bytes: %w", err)
	}
	return hex.EncodeToString(b), nil
}
