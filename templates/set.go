package templates

import (
	"bytes"
	"crypto/sha256"
	"embed"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"probity/plan/inputerr"
	"regexp"
	"sort"
	"strings"
	"text/template"
	"unicode/utf8"
)

//go:embed files/*.md
var embedded embed.FS

// Names of the wording files other than the cautions, for Set.Text.
const (
	Method               = "method.md"
	Assumptions          = "assumptions.md"
	DecisionRule         = "decision-rule.md"
	Scope                = "scope.md"
	DeviationsNone       = "deviations-none.md"
	DeviationsIncomplete = "deviations-incomplete.md"
	SignoffIntro         = "signoff-intro.md"
)

// Roles of the sign-off block, in the order they are printed.
const (
	Prepared = "prepared"
	Reviewed = "reviewed"
	Approved = "approved"
)

// uses are the declared uses, in the order they are listed to users.
var uses = []string{"general", "safety", "medical", "vehicle", "credit", "employment"}

// roles are the sign-off roles, in print order.
var roles = []string{Prepared, Reviewed, Approved}

// Uses returns the uses a record can declare, in a fixed order: general,
// safety, medical, vehicle, credit, employment.
func Uses() []string { return append([]string(nil), uses...) }

// Roles returns the sign-off roles in print order: prepared, reviewed,
// approved.
func Roles() []string { return append([]string(nil), roles...) }

// SafetyRelevant reports whether a use is one whose cautions defer to a
// safety case, a regulator and licensed professionals (safety, medical,
// vehicle).
func SafetyRelevant(use string) bool {
	return use == "safety" || use == "medical" || use == "vehicle"
}

// Names returns every file name a set holds, sorted.
func Names() []string {
	var names []string
	for _, u := range uses {
		names = append(names, cautionFile(u))
	}
	for _, r := range roles {
		names = append(names, signoffFile(r))
	}
	names = append(names, Method, Assumptions, DecisionRule, Scope,
		DeviationsNone, DeviationsIncomplete, SignoffIntro)
	sort.Strings(names)
	return names
}

func cautionFile(use string) string  { return "caution-" + use + ".md" }
func signoffFile(role string) string { return "signoff-" + role + ".md" }

// isTemplate reports whether a file is executed as a text/template (every
// file except the cautions).
func isTemplate(name string) bool { return !strings.HasPrefix(name, "caution-") }

// ErrTemplate is wrapped by every error about a template file's name or
// content.
var ErrTemplate = errors.New("invalid template")

// fileError is the input error about one template file: path is the file
// as the user named it (the override directory joined with the file name),
// or "embedded:NAME" for an embedded file. It wraps ErrTemplate.
func fileError(path, msg string) *inputerr.Error {
	return &inputerr.Error{File: path, Msg: msg, Err: ErrTemplate}
}

// Set is a loaded, checked set of wording files.
type Set struct {
	text       map[string]string
	parsed     map[string]*template.Template
	overridden []string
}

// Load returns the wording set. With dir "" it is the embedded set. With a
// directory, each file found there replaces the embedded file of the same
// name; a file missing there falls back to the embedded one. Files whose
// names start with "." are ignored. A file with an unknown name, a
// subdirectory, a file that is not UTF-8, an empty caution, or a template
// that does not parse or names an unknown field is an error naming the file.
func Load(dir string) (*Set, error) {
	s := &Set{text: map[string]string{}, parsed: map[string]*template.Template{}}
	origin := map[string]string{}
	for _, name := range Names() {
		b, err := embedded.ReadFile("files/" + name)
		if err != nil {
			return nil, fmt.Errorf("embedded template %s is missing: %w", name, err)
		}
		s.text[name] = string(b)
		origin[name] = "embedded:" + name
	}
	if dir != "" {
		if err := s.override(dir, origin); err != nil {
			return nil, err
		}
	}
	for _, name := range Names() {
		if err := s.check(name, origin[name]); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// override reads the files of dir over the embedded ones.
func (s *Set) override(dir string, origin map[string]string) error {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return inputerr.FromPath(err)
	}
	known := map[string]bool{}
	for _, n := range Names() {
		known[n] = true
	}
	for _, e := range entries { // os.ReadDir sorts by name
		name := e.Name()
		if strings.HasPrefix(name, ".") {
			continue
		}
		path := filepath.Join(dir, name)
		if e.IsDir() {
			return fileError(path, "is a directory; the templates directory holds files only")
		}
		if !known[name] {
			return fileError(path, "is not a template file name (known: "+strings.Join(Names(), ", ")+")")
		}
		b, err := fs.ReadFile(os.DirFS(dir), name)
		if err != nil {
			return fileError(path, err.Error())
		}
		s.text[name] = string(b)
		origin[name] = path
		s.overridden = append(s.overridden, name)
	}
	return nil
}

// check validates one file and parses it when it is a template.
func (s *Set) check(name, path string) error {
	text := s.text[name]
	if !utf8.ValidString(text) {
		return fileError(path, "is not valid UTF-8 text")
	}
	if !isTemplate(name) {
		if len(Blocks(text)) == 0 {
			return fileError(path, "is empty; a caution cannot be removed, only reworded")
		}
		for _, u := range uses {
			if name == cautionFile(u) && SafetyRelevant(u) {
				if miss := checkSafetyCaution(text); miss != "" {
					return fileError(path, "lacks "+miss+", which the cautions for a "+u+" use must keep").
						WithHint("reword the caution, but keep its deferral to codes and standards, to the regulator and to licensed professionals")
				}
			}
		}
		return nil
	}
	t, err := template.New(name).Option("missingkey=error").Parse(text)
	if err != nil {
		return fileError(path, "does not parse: "+trimTemplateErr(err.Error(), name))
	}
	// Execute now, so a misspelt field is caught at load time rather than
	// while a record is being written.
	// Both a fully set and an empty Fields, so that the text under {{if}}
	// and under {{else}} is checked.
	for _, f := range []Fields{sampleFields(), {}} {
		var buf bytes.Buffer
		if err := t.Execute(&buf, f); err != nil {
			return fileError(path, "cannot be filled in: "+trimTemplateErr(err.Error(), name))
		}
	}
	switch {
	case name == DecisionRule:
		miss, err := checkDecisionRule(t)
		if err != nil {
			return fileError(path, "cannot be filled in: "+trimTemplateErr(err.Error(), name))
		}
		if miss != "" {
			return fileError(path, "does not state "+miss+"; the decision rule must state the numeric rule with the ceiling and the confidence").
				WithHint("reword the rule, but keep {{.Ceiling}}, {{.BoundConfidence}}, {{.SampleSize}} and, for a fixed plan, {{.AcceptanceNumber}}")
		}
	case strings.HasPrefix(name, "signoff-") && name != SignoffIntro:
		named, err := namesRecordID(t)
		if err != nil {
			return fileError(path, "cannot be filled in: "+trimTemplateErr(err.Error(), name))
		}
		if named {
			return fileError(path, "prints the record id ({{.RecordID}}); a signature's meaning is part of what the record id covers, so it cannot name the id (the id is printed beside every signature)")
		}
	}
	s.parsed[name] = t
	return nil
}

// Shapes of text/template's messages, to restate them for a reviewer.
var (
	execFieldErr = regexp.MustCompile(`^(\d+):\d+: executing "[^"]*" at <[^>]*>: can't evaluate field (\w+) in type`)
	lineErr      = regexp.MustCompile(`^(\d+)(?::\d+)?: (.*)$`)
)

// trimTemplateErr restates a text/template error without its "template:
// NAME:" prefix (the caller names the file): an unknown field becomes
// "line L: {{.Field}} is not a known field", other errors "line L: …".
func trimTemplateErr(msg, name string) string {
	msg = strings.TrimPrefix(msg, "template: ")
	msg = strings.TrimPrefix(msg, name+":")
	if m := execFieldErr.FindStringSubmatch(msg); m != nil {
		return "line " + m[1] + ": {{." + m[2] + "}} is not a known field (see templates.Fields)"
	}
	if m := lineErr.FindStringSubmatch(msg); m != nil {
		return "line " + m[1] + ": " + m[2]
	}
	return msg
}

// Caution returns the cautions for a declared use.
func (s *Set) Caution(use string) (string, error) {
	for _, u := range uses {
		if u == use {
			return s.text[cautionFile(use)], nil
		}
	}
	return "", fmt.Errorf("use %q is not one of %s", use, strings.Join(uses, ", "))
}

// Uses returns the uses a record can declare; see the package function Uses.
func (s *Set) Uses() []string { return Uses() }

// Text fills in the wording file name (one of the constants Method,
// Assumptions, …) with f.
func (s *Set) Text(name string, f Fields) (string, error) {
	t, ok := s.parsed[name]
	if !ok {
		return "", fmt.Errorf("%q is not a wording template", name)
	}
	var buf bytes.Buffer
	if err := t.Execute(&buf, f); err != nil {
		return "", fmt.Errorf("filling in %s: %w", name, err)
	}
	return buf.String(), nil
}

// SignatureMeaning returns the default meaning of a signature for a role
// (prepared, reviewed or approved), used when the sign-off gives none.
func (s *Set) SignatureMeaning(role string, f Fields) (string, error) {
	for _, r := range roles {
		if r == role {
			return s.Text(signoffFile(role), f)
		}
	}
	return "", fmt.Errorf("sign-off role %q is not one of %s", role, strings.Join(roles, ", "))
}

// Source returns the raw text of a file of the set ("" for an unknown name),
// for showing or exporting the wording in use.
func (s *Set) Source(name string) string { return s.text[name] }

// Overridden lists, sorted, the files that came from the override
// directory rather than the embedded set.
func (s *Set) Overridden() []string { return append([]string(nil), s.overridden...) }

// Fingerprint is the lowercase hex SHA-256 over every file of the set, in
// name order, each as its name, a NUL byte, its length in decimal, a NUL
// byte and its content. Two sets print the same wording exactly when their
// fingerprints agree.
func (s *Set) Fingerprint() string {
	h := sha256.New()
	for _, name := range Names() {
		fmt.Fprintf(h, "%s\x00%d\x00%s", name, len(s.text[name]), s.text[name])
	}
	return hex.EncodeToString(h.Sum(nil))
}
