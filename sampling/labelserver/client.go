package labelserver

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/http/httptest"
	"regexp"
	"strconv"
	"strings"
)

// Client is a labeler's side of the page's API, for a program that labels
// through the server as the page's script does (the demo's simulated
// labelers): it opens a worksheet's address, gives the labeler's name,
// reads the sequence and the items, and sends label events. Like a
// browser, it keeps the session's cookie and sends the CSRF token the page
// carries.
type Client struct {
	base string
	http *http.Client
	csrf string
}

// ErrRefused is the cause of a request the server refused; the error's
// text is the server's message.
var ErrRefused = errors.New("the labeling server refused the request")

// csrfMeta finds the CSRF token in the page.
var csrfMeta = regexp.MustCompile(`<meta name="csrf-token" content="([0-9a-f]+)">`)

// Open loads the worksheet's page at address (http://HOST:PORT/s/TOKEN/)
// with transport (nil: http.DefaultTransport), which opens a session.
func Open(transport http.RoundTripper, address string) (*Client, error) {
	jar, err := cookiejar.New(nil)
	if err != nil {
		return nil, err
	}
	if !strings.HasSuffix(address, "/") {
		address += "/"
	}
	c := &Client{base: address, http: &http.Client{Transport: transport, Jar: jar}}
	page, err := c.do("GET", "", nil)
	if err != nil {
		return nil, err
	}
	m := csrfMeta.FindSubmatch(page)
	if m == nil {
		return nil, fmt.Errorf("labelserver: %s is not a labeling page", address)
	}
	c.csrf = string(m[1])
	return c, nil
}

// Name gives the labeler's name, once per session.
func (c *Client) Name(name string) error {
	_, err := c.do("POST", "api/labeler", map[string]string{"name": name})
	return err
}

// State reads the labeling's state: the sequence of items and the count
// of labeled ones.
func (c *Client) State() (StateView, error) {
	var v StateView
	return v, c.getJSON("api/state", &v)
}

// Item reads one item of the sequence.
func (c *Client) Item(item int) (ItemView, error) {
	var v ItemView
	return v, c.getJSON("api/item/"+strconv.Itoa(item), &v)
}

// Label sends a label event; the answer comes once the event is in the
// trail on disk.
func (c *Client) Label(ev LabelRequest) (LabelView, error) {
	var v LabelView
	data, err := c.do("POST", "api/label", ev)
	if err != nil {
		return v, err
	}
	return v, json.Unmarshal(data, &v)
}

func (c *Client) getJSON(rel string, v any) error {
	data, err := c.do("GET", rel, nil)
	if err != nil {
		return err
	}
	return json.Unmarshal(data, v)
}

// do sends a request relative to the worksheet's address; body, when not
// nil, goes as JSON with the CSRF token.
func (c *Client) do(method, rel string, body any) ([]byte, error) {
	var rd io.Reader
	if body != nil {
		b, err := json.Marshal(body)
		if err != nil {
			return nil, err
		}
		rd = bytes.NewReader(b)
	}
	req, err := http.NewRequest(method, c.base+rel, rd)
	if err != nil {
		return nil, err
	}
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
		req.Header.Set(csrfHeader, c.csrf)
	}
	resp, err := c.http.Do(req)
	if err != nil {
		return nil, err
	}
	defer resp.Body.Close()
	data, err := io.ReadAll(resp.Body)
	if err != nil {
		return nil, err
	}
	if resp.StatusCode != http.StatusOK {
		var e struct {
			Error string `json:"error"`
		}
		json.Unmarshal(data, &e)
		return nil, fmt.Errorf("%w: %s %s: %d %s", ErrRefused, method, rel, resp.StatusCode, e.Error)
	}
	return data, nil
}

// InProcess is a transport that hands every request to h in this process,
// without a network: a program labels through the server's handler
// exactly as a browser would through its address.
func InProcess(h http.Handler) http.RoundTripper { return inProcess{h} }

type inProcess struct{ h http.Handler }

func (t inProcess) RoundTrip(req *http.Request) (*http.Response, error) {
	rec := httptest.NewRecorder()
	if req.Body == nil {
		req.Body = http.NoBody
	}
	t.h.ServeHTTP(rec, req)
	resp := rec.Result()
	resp.Request = req
	return resp, nil
}
