package signature

import (
	"bytes"
	"errors"
	"fmt"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"

	"probity/plan/inputerr"
	"probity/plan/personname"
	"probity/plan/record"
)

// OperatorRole is the signers-file role of whoever issues and seals
// records (`probity record --sign-key`): the key of record.sig.
const OperatorRole = "operator"

// SignerRoles are the roles a signers file may give: the sign-off roles
// (prepared, reviewed, approved) and OperatorRole.
func SignerRoles() []string { return append(append([]string{}, record.SignoffRoles...), OperatorRole) }

// ErrSignersFile is wrapped by every error about a signers file's content.
var ErrSignersFile = errors.New("invalid signers file")

// Signer is one person a signers file names.
type Signer struct {
	// Name is the printed name (NFC, trimmed), Roles the roles the key may
	// sign in, Key the fingerprint of the public key ("sha256:…").
	Name  string
	Roles []string
	Key   string
	// Line is where the entry starts in the file.
	Line int
}

// Signers is a signers file: which key belongs to whom, and in which
// roles it may sign. It is the trust a verification of people's
// signatures rests on, so it is kept by whoever answers for the records
// (a quality unit), not by the signers. On disk (YAML):
//
//	signers:
//	  - name: Dana Example
//	    roles: [prepared]
//	    key: sha256:<hex SHA-256 of the public key, as probity keygen prints it>
//	  - name: Jo Example
//	    roles: [reviewed, approved]
//	    key: sha256:…
//	  - name: Audit operations
//	    roles: [operator]
//	    key: sha256:…
//
// Every key is required; unknown keys are refused; a key fingerprint may
// appear once (one key, one person); names are cleaned as
// personname.Clean does.
type Signers struct {
	Path string
	List []Signer
}

type signersFile struct {
	Signers []struct {
		Name  string   `yaml:"name"`
		Roles []string `yaml:"roles"`
		Key   string   `yaml:"key"`
	} `yaml:"signers"`
}

// ParseSigners reads a signers file; name is used in error messages, which
// give the line and the field.
func ParseSigners(data []byte, name string) (*Signers, error) {
	bad := func(line int, field, format string, args ...any) *inputerr.Error {
		return inputerr.At(name, line, field, "%w: %s", ErrSignersFile, fmt.Sprintf(format, args...))
	}
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		return nil, bad(0, "", "%s", strings.TrimPrefix(err.Error(), "yaml: "))
	}
	var f signersFile
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	if err := dec.Decode(&f); err != nil {
		return nil, bad(0, "", "%s", strings.TrimPrefix(err.Error(), "yaml: "))
	}
	var more yaml.Node
	if err := dec.Decode(&more); err == nil {
		return nil, bad(0, "", "the file holds more than one YAML document")
	}
	entries := signerNodes(&root)
	if len(f.Signers) == 0 {
		return nil, bad(0, "signers", "the file names no signer").WithHint("list each signer under signers: with name, roles and key (see 'probity sign --help')")
	}
	out := &Signers{Path: name}
	keys := map[string]int{}
	for i, e := range f.Signers {
		line := 0
		if i < len(entries) {
			line = entries[i].Line
		}
		field := func(k string) (int, string) {
			l := line
			if i < len(entries) {
				for j := 0; j+1 < len(entries[i].Content); j += 2 {
					if entries[i].Content[j].Value == k {
						l = entries[i].Content[j].Line
					}
				}
			}
			return l, fmt.Sprintf("signers[%d].%s", i, k)
		}
		n, err := personname.Clean(e.Name)
		if err != nil {
			l, fl := field("name")
			return nil, bad(l, fl, "%v", err)
		}
		if n == "" {
			l, fl := field("name")
			return nil, bad(l, fl, "the name is missing")
		}
		if len(e.Roles) == 0 {
			l, fl := field("roles")
			return nil, bad(l, fl, "no role is given (use %s)", strings.Join(SignerRoles(), ", "))
		}
		for _, r := range e.Roles {
			if !slices.Contains(SignerRoles(), r) {
				l, fl := field("roles")
				return nil, bad(l, fl, "%q is not a role (use %s)", r, strings.Join(SignerRoles(), ", "))
			}
		}
		if !strings.HasPrefix(e.Key, "sha256:") || !isHex(strings.TrimPrefix(e.Key, "sha256:"), 64) {
			l, fl := field("key")
			return nil, bad(l, fl, "%q is not a key fingerprint (sha256: and 64 lowercase hex digits, as probity keygen prints it)", e.Key)
		}
		if prev, dup := keys[e.Key]; dup {
			l, fl := field("key")
			return nil, bad(l, fl, "key %s is listed twice (lines %d and %d); a key belongs to one person", e.Key, prev, l)
		}
		keys[e.Key] = line
		out.List = append(out.List, Signer{Name: n, Roles: append([]string{}, e.Roles...), Key: e.Key, Line: line})
	}
	return out, nil
}

// signerNodes are the YAML nodes of the entries under signers:, for their
// lines.
func signerNodes(root *yaml.Node) []*yaml.Node {
	if len(root.Content) == 0 || root.Content[0].Kind != yaml.MappingNode {
		return nil
	}
	top := root.Content[0]
	for j := 0; j+1 < len(top.Content); j += 2 {
		if top.Content[j].Value == "signers" && top.Content[j+1].Kind == yaml.SequenceNode {
			return top.Content[j+1].Content
		}
	}
	return nil
}

// Lookup returns the signer whose key has the fingerprint fp.
func (s *Signers) Lookup(fp string) (Signer, bool) {
	for _, x := range s.List {
		if x.Key == fp {
			return x, true
		}
	}
	return Signer{}, false
}

// Check reports whether the key fp belongs, in the signers file, to the
// person called name (compared as personname.Same does) and may sign in
// role; the error says what does not match and matches ErrMismatch.
func (s *Signers) Check(fp, name, role string) error {
	x, ok := s.Lookup(fp)
	if !ok {
		return mismatchf("key %s is not in the signers file %s", fp, s.Path)
	}
	if name != "" && !personname.Same(x.Name, name) {
		return mismatchf("key %s belongs to %s in %s (line %d), not to %s", fp, x.Name, s.Path, x.Line, name)
	}
	if !slices.Contains(x.Roles, role) {
		return mismatchf("%s (key %s) may sign as %s in %s (line %d), not as %s", x.Name, fp, strings.Join(x.Roles, ", "), s.Path, x.Line, role)
	}
	return nil
}
