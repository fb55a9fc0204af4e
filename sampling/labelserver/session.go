package labelserver

import (
	"crypto/subtle"
	"errors"
	"net/http"
	"strings"
)

// sessionCookie is the name of the cookie that holds a session id.
const sessionCookie = "probity_session"

// maxSessions bounds the sessions kept; the oldest go first.
const maxSessions = 256

// session is one browser's labeling session on one worksheet: its CSRF
// token and, once given, the labeler's name.
type session struct {
	id, csrf string
	sheet    *sheet
	labeler  string
	serial   int
}

// sessions are the open sessions, guarded by Server.mu.
type sessions struct {
	byID   map[string]*session
	serial int
}

// sessionOf returns the request's session on sh (nil when the request has
// none, or one of another worksheet). The caller holds the lock.
func (s *Server) sessionOf(r *http.Request, sh *sheet) *session {
	c, err := r.Cookie(sessionCookie)
	if err != nil {
		return nil
	}
	ss := s.sess.byID[c.Value]
	if ss == nil || ss.sheet != sh {
		return nil
	}
	return ss
}

// newSession opens a session on sh and sets its cookie, scoped to the
// worksheet's path. The caller holds the lock.
func (s *Server) newSession(w http.ResponseWriter, sh *sheet) (*session, error) {
	id, err := randomHex(s.cfg.Random, 32)
	if err != nil {
		return nil, err
	}
	csrf, err := randomHex(s.cfg.Random, 32)
	if err != nil {
		return nil, err
	}
	if s.sess.byID[id] != nil || id == csrf {
		return nil, errors.New("labelserver: the random source repeats itself")
	}
	if len(s.sess.byID) >= maxSessions {
		var oldest *session
		for _, o := range s.sess.byID {
			if oldest == nil || o.serial < oldest.serial {
				oldest = o
			}
		}
		delete(s.sess.byID, oldest.id)
	}
	s.sess.serial++
	ss := &session{id: id, csrf: csrf, sheet: sh, serial: s.sess.serial}
	s.sess.byID[id] = ss
	http.SetCookie(w, &http.Cookie{Name: sessionCookie, Value: id, Path: sh.Path, HttpOnly: true, SameSite: http.SameSiteStrictMode})
	return ss, nil
}

// csrfHeader is the request header that carries the CSRF token.
const csrfHeader = "X-CSRF-Token"

// checkPost refuses a state-changing request that is not a same-origin
// JSON POST carrying the session's CSRF token; it returns the session.
// The caller holds the lock.
func (s *Server) checkPost(w http.ResponseWriter, r *http.Request, sh *sheet) *session {
	if ct := r.Header.Get("Content-Type"); !strings.HasPrefix(ct, "application/json") {
		deny(w, http.StatusUnsupportedMediaType, "a JSON request is expected")
		return nil
	}
	if o := r.Header.Get("Origin"); o != "" && o != "http://"+r.Host {
		deny(w, http.StatusForbidden, "cross-origin request refused")
		return nil
	}
	ss := s.sessionOf(r, sh)
	if ss == nil {
		deny(w, http.StatusForbidden, "no labeling session: reload the page")
		return nil
	}
	if subtle.ConstantTimeCompare([]byte(r.Header.Get(csrfHeader)), []byte(ss.csrf)) != 1 {
		deny(w, http.StatusForbidden, "the request's CSRF token is not this session's: reload the page")
		return nil
	}
	return ss
}
