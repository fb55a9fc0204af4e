package labelserver

import (
	"embed"
	"html/template"
	"net/http"
)

// assets are the page's files, embedded in the binary: the page works
// offline and loads nothing from elsewhere.
//
//go:embed assets/index.html assets/app.js assets/app.css
var assets embed.FS

// pageTemplate is the labeling page; pageData fills it.
var pageTemplate = template.Must(template.ParseFS(assets, "assets/index.html"))

// pageData is what the page carries in its HTML: the session's CSRF token
// and the worksheet's title.
type pageData struct {
	CSRF, Title string
}

// asset serves an embedded file.
func (s *Server) asset(name, contentType string) http.HandlerFunc {
	data, err := assets.ReadFile("assets/" + name)
	if err != nil {
		panic("labelserver: missing embedded asset " + name)
	}
	return func(w http.ResponseWriter, r *http.Request) {
		if s.sheetOf(r) == nil {
			denyToken(w)
			return
		}
		w.Header().Set("Content-Type", contentType)
		w.Write(data)
	}
}
