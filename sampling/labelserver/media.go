package labelserver

import (
	"bytes"
	"io"
	"net/http"
	"net/url"
	"os"
	"path"
	"path/filepath"
	"strings"

	"probity/sampling/drawfolder"
)

// imageTypes are the image files a shown column may name, by extension.
var imageTypes = map[string]string{
	".png": "image/png", ".jpg": "image/jpeg", ".jpeg": "image/jpeg", ".gif": "image/gif", ".webp": "image/webp",
}

// maxMedia is the largest media file served.
const maxMedia = 64 << 20

// mediaFiles are the shown values of rows that name an image file the
// media folder holds as a regular file, reached without leaving the folder
// (os.Root refuses ".." and symbolic links out of it); any other value is
// shown as text.
func mediaFiles(root *os.Root, rows []drawfolder.WorksheetRow) map[string]bool {
	out := map[string]bool{}
	if root == nil {
		return out
	}
	for _, r := range rows {
		for _, v := range r.Show {
			if out[v] || !isImageName(v) || !filepath.IsLocal(v) {
				continue
			}
			if st, err := root.Stat(v); err == nil && st.Mode().IsRegular() {
				out[v] = true
			}
		}
	}
	return out
}

// isImageName reports whether a shown value names an image file (by its
// extension, in any case).
func isImageName(v string) bool {
	_, ok := imageTypes[strings.ToLower(path.Ext(v))]
	return ok && strings.TrimSpace(v) == v && v != ""
}

// media serves an image of the media folder: only a name an item of the
// worksheet shows, only through the os.Root of the folder (no "..", no
// symbolic link out of it), only a regular file.
func (s *Server) media(w http.ResponseWriter, r *http.Request) {
	sh := s.sheetOf(r)
	if sh == nil {
		denyToken(w)
		return
	}
	name := r.PathValue("name")
	if s.root == nil || !sh.media[name] {
		deny(w, http.StatusNotFound, "no such media file")
		return
	}
	f, err := s.root.Open(name)
	if err != nil {
		deny(w, http.StatusNotFound, "no such media file")
		return
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil || !st.Mode().IsRegular() || st.Size() > maxMedia {
		deny(w, http.StatusNotFound, "no such media file")
		return
	}
	data, err := io.ReadAll(io.LimitReader(f, maxMedia))
	if err != nil {
		deny(w, http.StatusInternalServerError, "cannot read the media file")
		return
	}
	w.Header().Set("Content-Type", imageTypes[strings.ToLower(path.Ext(name))])
	http.ServeContent(w, r, "", st.ModTime(), bytes.NewReader(data))
}

// imageOf is the page's address of a shown value that names an image of
// the media folder ("" when it is text): relative to the worksheet's path.
func (s *Server) imageOf(sh *sheet, v string) string {
	if s.root == nil || !sh.media[v] {
		return ""
	}
	parts := strings.Split(v, "/")
	for i, p := range parts {
		parts[i] = url.PathEscape(p)
	}
	return "media/" + strings.Join(parts, "/")
}
