package plan

import (
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"

	"probity/plan/inputerr"
)

// Source is a plan file as written: its name and its YAML node tree, in
// which a check of the plan (File.Check, and the sequential section's in
// plan/sequential) finds the line of a field it names by its path in the
// file ("rule.sample_size", "candidates[1].positive",
// "sequential.accept_if_errors_at_most[11]") and the digits a number was
// written with. Lookups walk the tree on demand: a sequential plan's
// boundary arrays hold hundreds of thousands of values, and indexing each
// would cost more than checking them.
type Source struct {
	// Name is the file as the user named it.
	Name string
	root *yaml.Node
}

// newSource wraps the document node of a plan file.
func newSource(name string, doc *yaml.Node) *Source {
	s := &Source{Name: name}
	if doc != nil && doc.Kind == yaml.DocumentNode && len(doc.Content) == 1 {
		s.root = doc.Content[0]
	}
	return s
}

// lookup finds the node of a field: the line of its key (of the element,
// for a sequence element) and its value node.
func (s *Source) lookup(field string) (line int, value *yaml.Node, ok bool) {
	if s == nil || s.root == nil || field == "" {
		return 0, nil, false
	}
	n := s.root
	for _, step := range fieldSteps(field) {
		switch {
		case step.index >= 0:
			if n.Kind != yaml.SequenceNode || step.index >= len(n.Content) {
				return 0, nil, false
			}
			n = n.Content[step.index]
			line = n.Line
		default:
			if n.Kind != yaml.MappingNode {
				return 0, nil, false
			}
			found := false
			for i := 0; i+1 < len(n.Content); i += 2 {
				if n.Content[i].Value == step.key {
					line, n, found = n.Content[i].Line, n.Content[i+1], true
					break
				}
			}
			if !found {
				return 0, nil, false
			}
		}
	}
	return line, n, true
}

// fieldStep is one step of a field path: a key, or an index (≥ 0).
type fieldStep struct {
	key   string
	index int
}

// fieldSteps splits "a.b[2].c" into a, b, [2], c.
func fieldSteps(field string) []fieldStep {
	var out []fieldStep
	for _, part := range strings.Split(field, ".") {
		key, rest, _ := strings.Cut(part, "[")
		if key != "" {
			out = append(out, fieldStep{key: key, index: -1})
		}
		for rest != "" {
			num, after, _ := strings.Cut(rest, "]")
			i, err := strconv.Atoi(num)
			if err != nil || i < 0 {
				return []fieldStep{{key: field, index: -1}} // matches no key
			}
			out = append(out, fieldStep{index: i})
			rest = strings.TrimPrefix(after, "[")
		}
	}
	return out
}

// Line is the 1-based line of the field's key (of the element, for a
// sequence element), or of the nearest enclosing key the file has; 0 when
// none.
func (s *Source) Line(field string) int {
	for f := field; f != ""; f = parentField(f) {
		if line, _, ok := s.lookup(f); ok {
			return line
		}
	}
	return 0
}

// Has reports whether the file writes the field (a key with any value,
// null included).
func (s *Source) Has(field string) bool {
	_, _, ok := s.lookup(field)
	return ok
}

// Text is the field's value as written, for a scalar; "" otherwise.
func (s *Source) Text(field string) string {
	_, n, ok := s.lookup(field)
	if !ok || n.Kind != yaml.ScalarNode {
		return ""
	}
	return n.Value
}

// FieldAt is the last field whose key (or sequence element) is on line,
// "" when none.
func (s *Source) FieldAt(line int) string {
	if s == nil || s.root == nil {
		return ""
	}
	found := ""
	var walk func(path string, n *yaml.Node)
	walk = func(path string, n *yaml.Node) {
		switch n.Kind {
		case yaml.MappingNode:
			for i := 0; i+1 < len(n.Content); i += 2 {
				k, v := n.Content[i], n.Content[i+1]
				p := k.Value
				if path != "" {
					p = path + "." + k.Value
				}
				if k.Line == line {
					found = p
				}
				if k.Line <= line {
					walk(p, v)
				}
			}
		case yaml.SequenceNode:
			for i, v := range n.Content {
				if v.Line > line {
					break
				}
				p := fmt.Sprintf("%s[%d]", path, i)
				if v.Line == line {
					found = p
				}
				walk(p, v)
			}
		}
	}
	walk("", s.root)
	return found
}

// Errorf is the input error about a field of the file: it names the
// file, the field's line and the field, and wraps ErrPlanFile.
func (s *Source) Errorf(field, format string, args ...any) *inputerr.Error {
	name := ""
	if s != nil {
		name = s.Name
	}
	e := inputerr.At(name, s.Line(field), field, format, args...)
	e.Err = planFileCause(e.Err)
	return e.WithHint(editedHint)
}

// editedHint is the hint of every refusal of a plan file's content.
const editedHint = "use the plan file written by probity plan, unedited; to change a plan, make a new one"

// planFileCause joins ErrPlanFile with a cause a message wrapped.
func planFileCause(err error) error {
	if err == nil {
		return ErrPlanFile
	}
	return fmt.Errorf("%w: %w", ErrPlanFile, err)
}

// parentField is the field one level up ("rule" for "rule.sample_size",
// "candidates" for "candidates[1]"), "" at the top.
func parentField(f string) string {
	if strings.HasSuffix(f, "]") {
		if i := strings.LastIndexByte(f, '['); i > 0 {
			return f[:i]
		}
	}
	if i := strings.LastIndexByte(f, '.'); i > 0 {
		return f[:i]
	}
	return ""
}

// maxCheckedDigits is the most significant digits in which a stated
// number must agree with its recomputation. probity writes risks with
// every digit of a float64 (17); their last few can differ between
// processors (a fused multiply-add on one, two roundings on another), so
// a plan made on one machine must still load on another.
const maxCheckedDigits = 13

// Agrees reports whether the number the file states for field agrees
// with recomputed to the digits the file holds (at most
// maxCheckedDigits significant digits): |stated − recomputed| is at most
// half a unit in the last digit written. A value the file does not hold
// as a number agrees with nothing.
func (s *Source) Agrees(field string, stated, recomputed float64) bool {
	return agrees(s.Text(field), stated, recomputed)
}

// agrees is Agrees for a number written as text ("" when it was not read
// from a file: it must then agree to maxCheckedDigits).
func agrees(text string, stated, recomputed float64) bool {
	if math.IsNaN(stated) || math.IsNaN(recomputed) || math.IsInf(stated, 0) || math.IsInf(recomputed, 0) {
		return false
	}
	if stated == recomputed {
		return true
	}
	d := significantDigits(text)
	if d == 0 {
		d = 17 // not from a file: exact to float64's digits
	}
	d = min(d, maxCheckedDigits)
	scale := math.Abs(stated)
	if scale == 0 {
		scale = math.Abs(recomputed)
	}
	// half a unit in the d-th significant digit of the stated value
	exp := math.Floor(math.Log10(scale))
	tol := 0.5 * math.Pow(10, exp-float64(d)+1)
	return math.Abs(stated-recomputed) <= tol*(1+1e-9)
}

// significantDigits counts the significant digits of a decimal number as
// written ("0.0247" has 3, "1.50e-3" has 3, "0.025000000000000022" has
// 17); 0 when text is not a decimal number.
func significantDigits(text string) int {
	t := strings.TrimLeft(text, "+-")
	if i := strings.IndexAny(t, "eE"); i >= 0 {
		t = t[:i]
	}
	if _, err := strconv.ParseFloat(t, 64); err != nil || t == "" {
		return 0
	}
	t = strings.Replace(t, ".", "", 1)
	t = strings.TrimLeft(t, "0")
	n := 0
	for _, r := range t {
		if r >= '0' && r <= '9' {
			n++
		}
	}
	return n
}

// unknownKey returns the path of the first key of the mapping tree n that
// has no field in the Go type t (by its yaml tag), "" when every key is
// known. It mirrors yaml.v3's KnownFields, which does not say where.
func unknownKey(path string, n *yaml.Node, t reflect.Type) string {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if n == nil {
		return ""
	}
	switch n.Kind {
	case yaml.DocumentNode:
		for _, c := range n.Content {
			if k := unknownKey(path, c, t); k != "" {
				return k
			}
		}
	case yaml.MappingNode:
		if t.Kind() != reflect.Struct || t == reflect.TypeOf(struct{}{}) {
			return ""
		}
		fields := yamlFields(t)
		for i := 0; i+1 < len(n.Content); i += 2 {
			k := n.Content[i].Value
			p := k
			if path != "" {
				p = path + "." + k
			}
			ft, ok := fields[k]
			if !ok {
				return p
			}
			if u := unknownKey(p, n.Content[i+1], ft); u != "" {
				return u
			}
		}
	case yaml.SequenceNode:
		if t.Kind() != reflect.Slice {
			return ""
		}
		for i, c := range n.Content {
			if c.Kind != yaml.MappingNode {
				continue // only a mapping has keys (a boundary array has none)
			}
			if u := unknownKey(fmt.Sprintf("%s[%d]", path, i), c, t.Elem()); u != "" {
				return u
			}
		}
	}
	return ""
}

// yamlFields maps the yaml keys of struct type t to their field types.
func yamlFields(t reflect.Type) map[string]reflect.Type {
	out := map[string]reflect.Type{}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		if !f.IsExported() {
			continue
		}
		name, _, _ := strings.Cut(f.Tag.Get("yaml"), ",")
		if name == "-" {
			continue
		}
		if name == "" {
			name = strings.ToLower(f.Name)
		}
		out[name] = f.Type
	}
	return out
}
