package labelserver

import (
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"probity/plan/inputerr"
	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
)

// maxBody is the largest request body accepted.
const maxBody = 64 << 10

func (s *Server) routes() *http.ServeMux {
	m := http.NewServeMux()
	m.HandleFunc("/", func(w http.ResponseWriter, r *http.Request) { denyToken(w) })
	m.HandleFunc("GET /s/{token}/{$}", s.page)
	m.HandleFunc("GET /s/{token}/app.js", s.asset("app.js", "text/javascript; charset=utf-8"))
	m.HandleFunc("GET /s/{token}/app.css", s.asset("app.css", "text/css; charset=utf-8"))
	m.HandleFunc("GET /s/{token}/api/state", s.state)
	m.HandleFunc("GET /s/{token}/api/item/{item}", s.item)
	m.HandleFunc("POST /s/{token}/api/labeler", s.labeler)
	m.HandleFunc("POST /s/{token}/api/label", s.label)
	m.HandleFunc("GET /s/{token}/media/{name...}", s.media)
	return m
}

// deny answers with a status and a one-line JSON error.
func deny(w http.ResponseWriter, status int, msg string) {
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.WriteHeader(status)
	json.NewEncoder(w).Encode(map[string]string{"error": msg})
}

// denyToken refuses a request without a worksheet's token.
func denyToken(w http.ResponseWriter) {
	deny(w, http.StatusForbidden, "forbidden: use the labeling address as it was given, with its access token")
}

func writeJSON(w http.ResponseWriter, v any) {
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(true)
	enc.Encode(v)
}

// StateView is what the page needs to start: the labeler, the worksheet,
// the classes, the sequence of items and the count of labeled ones.
type StateView struct {
	Labeler  string          `json:"labeler"`
	Title    string          `json:"title"`
	Classes  []string        `json:"classes"`
	Sequence []SequenceEntry `json:"sequence"`
	Labeled  int             `json:"labeled"`
	Total    int             `json:"total"`
	// Resume is the position in Sequence of the first item not labeled
	// (Total when every item is).
	Resume int `json:"resume"`
	// Spares is set when an unsure item of this worksheet may be
	// replaced by a spare (the first worksheet; the second has none).
	Spares bool `json:"spares"`
}

// SequenceEntry is one item of the sequence; SpareFor is the item a spare
// stands in for (0 for a sample item); Labeled is set once the item holds
// a label (a class or unsure) on this worksheet.
type SequenceEntry struct {
	Item     int  `json:"item"`
	SpareFor int  `json:"spare_for,omitempty"`
	Labeled  bool `json:"labeled,omitempty"`
}

// ItemView is one item as the labeler sees it: the worksheet's row only.
type ItemView struct {
	Item     int         `json:"item"`
	RecordID string      `json:"record_id"`
	Fields   []FieldView `json:"fields"`
	Label    string      `json:"label"`
	Note     string      `json:"note"`
	Labeler  string      `json:"labeler"`
	SpareFor int         `json:"spare_for,omitempty"`
}

// FieldView is a shown column; Image is set when its value names an image
// of the media folder.
type FieldView struct {
	Name  string `json:"name"`
	Value string `json:"value"`
	Image string `json:"image,omitempty"`
}

// LabelView answers a label event: the item as it now is, the count, the
// sequence when the event changed which items it holds (nil otherwise: a
// spare assigned or given back; the page marks the item labeled itself),
// and the spare offered when the item was marked unsure.
type LabelView struct {
	Item     ItemView        `json:"item"`
	Sequence []SequenceEntry `json:"sequence,omitempty"`
	Labeled  int             `json:"labeled"`
	Total    int             `json:"total"`
	// Offer is the spare that replaces the item (0: none); NoSpare is set
	// when the item is unsure and its group has no spare left.
	Offer   int  `json:"offer,omitempty"`
	NoSpare bool `json:"no_spare,omitempty"`
}

// page serves the labeling page, opening a session when the browser has
// none on this worksheet.
func (s *Server) page(w http.ResponseWriter, r *http.Request) {
	sh := s.sheetOf(r)
	if sh == nil {
		denyToken(w)
		return
	}
	s.mu.Lock()
	ss := s.sessionOf(r, sh)
	var err error
	if ss == nil {
		ss, err = s.newSession(w, sh)
	}
	s.mu.Unlock()
	if err != nil {
		deny(w, http.StatusInternalServerError, "cannot open a session")
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	pageTemplate.Execute(w, pageData{CSRF: ss.csrf, Title: sh.Title})
}

// sequenceLocked is the worksheet's sequence and how many of its items
// are labeled. The caller holds the lock.
func (s *Server) sequenceLocked(sh *sheet) (seq []SequenceEntry, labeled, resume int) {
	st := s.cfg.Trail.State()
	if sh.spares == nil {
		for _, it := range sh.order {
			seq = append(seq, SequenceEntry{Item: it})
		}
	} else {
		a := sh.spares.assign(cellLabel(st, sh.Name))
		for _, it := range sh.spares.sequence(a) {
			seq = append(seq, SequenceEntry{Item: it, SpareFor: a.spareFor[it]})
		}
	}
	resume = len(seq)
	for i, e := range seq {
		if st.Cell(sh.Name, e.Item).Label != "" {
			seq[i].Labeled = true
			labeled++
		} else if resume == len(seq) {
			resume = i
		}
	}
	return seq, labeled, resume
}

// state serves the labeling's state for the session.
func (s *Server) state(w http.ResponseWriter, r *http.Request) {
	sh := s.sheetOf(r)
	if sh == nil {
		denyToken(w)
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	ss := s.sessionOf(r, sh)
	if ss == nil {
		deny(w, http.StatusForbidden, "no labeling session: reload the page")
		return
	}
	seq, labeled, resume := s.sequenceLocked(sh)
	writeJSON(w, StateView{Labeler: ss.labeler, Title: sh.Title, Classes: s.cfg.Classes, Sequence: seq,
		Labeled: labeled, Total: len(seq), Resume: resume, Spares: sh.spares != nil})
}

// itemLocked is an item's view. The caller holds the lock.
func (s *Server) itemLocked(sh *sheet, item int) ItemView {
	r := sh.rows[item]
	c := s.cfg.Trail.State().Cell(sh.Name, item)
	v := ItemView{Item: item, RecordID: r.RecordID, Label: c.Label, Note: c.Note, Labeler: c.Labeler, Fields: []FieldView{}}
	for i, name := range s.cfg.Folder.Manifest.ShowColumns {
		val := ""
		if i < len(r.Show) {
			val = r.Show[i]
		}
		v.Fields = append(v.Fields, FieldView{Name: name, Value: val, Image: s.imageOf(sh, val)})
	}
	if sh.spares != nil && sh.spares.isSpare[item] {
		v.SpareFor = sh.spares.assign(cellLabel(s.cfg.Trail.State(), sh.Name)).spareFor[item]
	}
	return v
}

// item serves one item of the worksheet's sequence.
func (s *Server) item(w http.ResponseWriter, r *http.Request) {
	sh := s.sheetOf(r)
	if sh == nil {
		denyToken(w)
		return
	}
	item, err := strconv.Atoi(r.PathValue("item"))
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.sessionOf(r, sh) == nil {
		deny(w, http.StatusForbidden, "no labeling session: reload the page")
		return
	}
	if err != nil || !s.inSequenceLocked(sh, item) {
		deny(w, http.StatusNotFound, "no such item in this worksheet's sequence")
		return
	}
	writeJSON(w, s.itemLocked(sh, item))
}

// inSequenceLocked reports whether item is in the worksheet's sequence
// (an unassigned spare is not). The caller holds the lock.
func (s *Server) inSequenceLocked(sh *sheet, item int) bool {
	if _, ok := sh.rows[item]; !ok {
		return false
	}
	if sh.spares == nil || !sh.spares.isSpare[item] {
		return true
	}
	_, ok := sh.spares.assign(cellLabel(s.cfg.Trail.State(), sh.Name)).spareFor[item]
	return ok
}

// labeler names the session's labeler, once.
func (s *Server) labeler(w http.ResponseWriter, r *http.Request) {
	sh := s.sheetOf(r)
	if sh == nil {
		denyToken(w)
		return
	}
	var body struct {
		Name string `json:"name"`
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	ss := s.checkPost(w, r, sh)
	if ss == nil {
		return
	}
	if err := decodeBody(w, r, &body); err != nil {
		deny(w, http.StatusBadRequest, err.Error())
		return
	}
	name := strings.TrimSpace(body.Name)
	if err := labeltrail.CheckLabeler(name); err != nil {
		deny(w, http.StatusBadRequest, err.Error())
		return
	}
	if ss.labeler != "" && ss.labeler != name {
		deny(w, http.StatusConflict, fmt.Sprintf("this session already labels as %q; open the address in a new private window to label under another name", ss.labeler))
		return
	}
	ss.labeler = name
	writeJSON(w, map[string]string{"labeler": name})
}

// LabelRequest is a label event as the page sends it.
type LabelRequest struct {
	Item          int    `json:"item"`
	Label         string `json:"label"`
	Note          string `json:"note"`
	PreviousLabel string `json:"previous_label"`
	PreviousNote  string `json:"previous_note"`
	Reason        string `json:"reason"`
}

// label appends a label event to the trail and, once it is on disk,
// confirms it with the item's new state.
func (s *Server) label(w http.ResponseWriter, r *http.Request) {
	sh := s.sheetOf(r)
	if sh == nil {
		denyToken(w)
		return
	}
	var req LabelRequest
	s.mu.Lock()
	defer s.mu.Unlock()
	ss := s.checkPost(w, r, sh)
	if ss == nil {
		return
	}
	if ss.labeler == "" {
		deny(w, http.StatusForbidden, "give your name first")
		return
	}
	if err := decodeBody(w, r, &req); err != nil {
		deny(w, http.StatusBadRequest, err.Error())
		return
	}
	if !s.inSequenceLocked(sh, req.Item) {
		deny(w, http.StatusConflict, "this spare replaces no unsure item: it cannot be labeled")
		return
	}
	st := s.cfg.Trail.State()
	if sh.spares != nil {
		cur := cellLabel(st, sh.Name)
		after := func(item int) string {
			if item == req.Item {
				return req.Label
			}
			return cur(item)
		}
		if bad, first, ok := sh.spares.check(after); !ok && req.Label != cur(req.Item) {
			msg := fmt.Sprintf("not allowed: spare item %d would be labeled without an unsure item to replace; clear its label first", bad)
			if first != 0 {
				msg = fmt.Sprintf("not allowed: spares are used in order; label spare item %d first", first)
			}
			deny(w, http.StatusConflict, msg)
			return
		}
	}
	before, _, _ := s.sequenceLocked(sh)
	ev := labeltrail.Label{Labeler: ss.labeler, Sheet: sh.Name, Item: req.Item, RecordID: sh.rows[req.Item].RecordID,
		PreviousLabel: req.PreviousLabel, Label: req.Label, PreviousNote: req.PreviousNote, Note: req.Note, Reason: strings.TrimSpace(req.Reason)}
	if _, err := s.cfg.Trail.Append(s.cfg.Now(), ev); err != nil {
		switch {
		case errors.Is(err, labeltrail.ErrConflict):
			deny(w, http.StatusConflict, "the item was changed meanwhile (by another labeler): it is shown again as it now is")
		case inputerr.Is(err):
			deny(w, http.StatusBadRequest, messageOf(err))
		default:
			deny(w, http.StatusInternalServerError, "the label could not be saved: "+err.Error())
		}
		return
	}
	seq, labeled, _ := s.sequenceLocked(sh)
	v := LabelView{Item: s.itemLocked(sh, req.Item), Labeled: labeled, Total: len(seq)}
	if !sameItems(before, seq) {
		v.Sequence = seq
	}
	if req.Label == drawfolder.Unsure && sh.spares != nil {
		a := sh.spares.assign(cellLabel(st, sh.Name))
		orig := req.Item
		if f, ok := a.spareFor[orig]; ok {
			orig = f
		}
		for sp := range a.blank {
			if a.spareFor[sp] == orig {
				v.Offer = sp
			}
		}
		v.NoSpare = v.Offer == 0
	}
	writeJSON(w, v)
}

// sameItems reports whether two sequences hold the same items, each as
// the same spare.
func sameItems(a, b []SequenceEntry) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].Item != b[i].Item || a[i].SpareFor != b[i].SpareFor {
			return false
		}
	}
	return true
}

// messageOf is an input error's message without the trail's file and
// line (the page speaks of the item, not the file).
func messageOf(err error) string {
	if e, ok := inputerr.As(err); ok {
		return e.Msg
	}
	return err.Error()
}

// decodeBody decodes a JSON request body of at most maxBody bytes,
// refusing unknown fields.
func decodeBody(w http.ResponseWriter, r *http.Request, v any) error {
	dec := json.NewDecoder(http.MaxBytesReader(w, r.Body, maxBody))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return fmt.Errorf("not a valid request: %v", err)
	}
	return nil
}
