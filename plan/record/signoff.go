package record

import (
	"bytes"
	"errors"
	"probity/plan/inputerr"
	"probity/plan/personname"
	"strings"
	"time"

	"gopkg.in/yaml.v3"
)

// ErrSignoffFile is wrapped by every error about a sign-off file.
var ErrSignoffFile = errors.New("invalid sign-off file")

// SignoffRoles are the roles a sign-off file may fill, in print order.
var SignoffRoles = []string{"prepared", "reviewed", "approved"}

// signoffEntry is one role in a sign-off file.
type signoffEntry struct {
	Name    string `yaml:"name"`
	Title   string `yaml:"title"`
	Date    string `yaml:"date"`
	Meaning string `yaml:"meaning"`
}

// ParseSignoff reads a sign-off file (YAML):
//
//	prepared:
//	  name: Dana Example
//	  title: ML engineer
//	  date: 2026-03-02        # optional, YYYY-MM-DD
//	  meaning: ...            # optional; the templates' default otherwise
//	reviewed: { ... }
//	approved: { ... }
//
// Every key is optional; unknown keys are refused. name is used in error
// messages, which give the line and the field.
func ParseSignoff(data []byte, name string) ([]Signoff, error) {
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		return nil, inputerr.At(name, 0, "", "%w: %v", ErrSignoffFile, err)
	}
	if len(root.Content) == 0 {
		return nil, nil
	}
	top := root.Content[0]
	if top.Kind != yaml.MappingNode {
		return nil, inputerr.At(name, top.Line, "", "%w: expected the keys %s", ErrSignoffFile, strings.Join(SignoffRoles, ", "))
	}
	byRole := map[string]Signoff{}
	for i := 0; i+1 < len(top.Content); i += 2 {
		k, v := top.Content[i], top.Content[i+1]
		known := false
		for _, r := range SignoffRoles {
			known = known || r == k.Value
		}
		if !known {
			return nil, inputerr.At(name, k.Line, k.Value, "%w: unknown role (use %s)", ErrSignoffFile, strings.Join(SignoffRoles, ", "))
		}
		if _, dup := byRole[k.Value]; dup {
			return nil, inputerr.At(name, k.Line, k.Value, "%w: the role is given twice", ErrSignoffFile)
		}
		var e signoffEntry
		enc, _ := yaml.Marshal(v)
		dec := yaml.NewDecoder(bytes.NewReader(enc))
		dec.KnownFields(true)
		if err := dec.Decode(&e); err != nil {
			return nil, inputerr.At(name, v.Line, k.Value, "%w: %s", ErrSignoffFile, yamlReason(err))
		}
		if e.Date != "" {
			if _, err := time.Parse("2006-01-02", e.Date); err != nil {
				return nil, inputerr.At(name, keyLine(v, "date"), k.Value+".date", "%w: %q is not a date in the form YYYY-MM-DD", ErrSignoffFile, e.Date)
			}
		}
		// A meaning may be written over several lines (a YAML block): its
		// lines are joined with single spaces. A name or title is one line.
		e.Meaning = strings.Join(strings.Fields(e.Meaning), " ")
		clean := map[string]*string{"name": &e.Name, "title": &e.Title, "meaning": &e.Meaning}
		for _, field := range []string{"name", "title", "meaning"} {
			c, err := personname.Clean(*clean[field])
			if err != nil {
				return nil, inputerr.At(name, keyLine(v, field), k.Value+"."+field, "%w: %v", ErrSignoffFile, err).
					WithHint("retype the text: it holds a character that prints nothing or reorders the text around it")
			}
			*clean[field] = c
		}
		byRole[k.Value] = Signoff{Role: k.Value, Name: e.Name, Title: e.Title, Date: e.Date, Meaning: e.Meaning}
	}
	var out []Signoff
	for _, r := range SignoffRoles {
		if s, ok := byRole[r]; ok {
			out = append(out, s)
		}
	}
	return out, nil
}

// keyLine is the line of key in the mapping v, or v's own line.
func keyLine(v *yaml.Node, key string) int {
	for j := 0; j+1 < len(v.Content); j += 2 {
		if v.Content[j].Value == key {
			return v.Content[j].Line
		}
	}
	return v.Line
}

// yamlReason drops yaml.v3's "yaml: " prefix and line numbers relative to
// the re-encoded fragment.
func yamlReason(err error) string {
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	msg = strings.TrimPrefix(msg, "unmarshal errors:\n  ")
	if i := strings.Index(msg, ": "); strings.HasPrefix(msg, "line ") && i > 0 {
		msg = msg[i+2:]
	}
	return msg
}
