package trend

import (
	"bytes"
	"encoding"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"
	"time"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/plan/record"
)

// Entry is one record.json read for a trend, with the path it came from.
type Entry struct {
	// Path is the file as named on the command line or found under a
	// folder given on it.
	Path   string
	Record record.Record
	// Unauthenticated marks a record charted although its signatures did
	// not authenticate it (or were not checked); the trend says so.
	Unauthenticated bool
}

// ErrNotRecord is wrapped by every error about a file that is not a usable
// record.json. Load's and Decode's errors are *inputerr.Error naming the
// file, the line and the JSON path of the field (e.g.
// "candidates[2].errors").
var ErrNotRecord = errors.New("not a usable record")

// Loaded is what Load found: the records, and the JSON files under a folder
// that were skipped because they are not records (a draw's manifest.json,
// for instance).
type Loaded struct {
	Entries []Entry
	Skipped []string
}

// Load reads the records named by paths. A path that is a file must be a
// record. A path that is a folder is searched recursively: every file named
// record.json must be a record; any other *.json is read when it is a JSON
// object with a record_id key and skipped otherwise. A file reached twice
// (by name and through its folder) is read once. Files under each folder
// are taken in lexical order.
func Load(paths []string) (*Loaded, error) {
	var out Loaded
	// isRecord remembers, per absolute path read, whether it was a record.
	isRecord := map[string]bool{}
	add := func(path string, mustBe bool) (bool, error) {
		abs, err := filepath.Abs(path)
		if err != nil {
			abs = path
		}
		if was, ok := isRecord[abs]; ok {
			return was, nil
		}
		data, err := inputfile.ReadFile(path, "record", inputfile.TableLimit)
		if err != nil {
			return false, &inputerr.Error{Err: errors.Join(ErrNotRecord, err), File: path, Msg: readReason(err)}
		}
		if !mustBe && !looksLikeRecord(data) {
			if !json.Valid(data) {
				return false, decodeError(path, data, json.Unmarshal(data, new(any)))
			}
			isRecord[abs] = false
			out.Skipped = append(out.Skipped, path)
			return false, nil
		}
		rec, err := Decode(data, path)
		if err != nil {
			return false, err
		}
		isRecord[abs] = true
		out.Entries = append(out.Entries, Entry{Path: path, Record: *rec})
		return true, nil
	}
	for _, p := range paths {
		st, err := os.Stat(p)
		if err != nil {
			return nil, &inputerr.Error{Err: ErrNotRecord, File: p, Msg: readReason(err)}
		}
		if !st.IsDir() {
			if _, err := add(p, true); err != nil {
				return nil, err
			}
			continue
		}
		var files []string
		err = filepath.WalkDir(p, func(path string, d fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if !d.IsDir() && strings.EqualFold(filepath.Ext(path), ".json") {
				files = append(files, path)
			}
			return nil
		})
		if err != nil {
			return nil, &inputerr.Error{Err: ErrNotRecord, File: p, Msg: readReason(err)}
		}
		sort.Strings(files)
		found := 0
		for _, f := range files {
			ok, err := add(f, filepath.Base(f) == record.JSONFile)
			if err != nil {
				return nil, err
			}
			if ok {
				found++
			}
		}
		if found == 0 {
			return nil, &inputerr.Error{Err: ErrNotRecord, File: p, Msg: "holds no record.json (no *.json file under it is a record)",
				Hint: "name the record files, or the folder the record command wrote them into"}
		}
	}
	return &out, nil
}

func readReason(err error) string {
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return "does not exist"
	case errors.Is(err, fs.ErrPermission):
		return "cannot be read: permission denied"
	}
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return "cannot be read: " + pe.Err.Error()
	}
	return "cannot be read: " + err.Error()
}

// looksLikeRecord reports whether data is a JSON object with a top-level
// record_id key.
func looksLikeRecord(data []byte) bool {
	var top map[string]json.RawMessage
	if json.Unmarshal(data, &top) != nil {
		return false
	}
	_, ok := top["record_id"]
	return ok
}

// requiredTop, requiredPlan and requiredCandidate are the keys a trend reads.
var (
	requiredTop       = []string{"format", "record_id", "date", "period", "plan", "candidates", "overall_verdict"}
	requiredPlan      = []string{"fingerprint", "method", "model", "design", "multiplicity", "ceiling", "confidence"}
	requiredCandidate = []string{"name", "labeled", "errors", "estimate", "upper_bound", "verdict"}
)

// Decode parses one record.json and checks the keys and values a trend
// relies on. name is used in error messages.
func Decode(data []byte, name string) (*record.Record, error) {
	var top map[string]json.RawMessage
	if err := json.Unmarshal(data, &top); err != nil {
		return nil, decodeError(name, data, err)
	}
	missing := func(field string, path ...any) error {
		return &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineOf(data, path), Field: field, Msg: "missing",
			Hint: "trend reads the record.json written by 'probity record'; was this file edited or cut short?"}
	}
	for _, k := range requiredTop {
		if _, ok := top[k]; !ok {
			return nil, missing(k)
		}
	}
	var planKeys map[string]json.RawMessage
	if err := json.Unmarshal(top["plan"], &planKeys); err != nil {
		return nil, &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineOf(data, []any{"plan"}), Field: "plan", Msg: "not an object"}
	}
	for _, k := range requiredPlan {
		if _, ok := planKeys[k]; !ok {
			return nil, missing("plan."+k, "plan")
		}
	}
	var cands []map[string]json.RawMessage
	if err := json.Unmarshal(top["candidates"], &cands); err != nil {
		return nil, &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineOf(data, []any{"candidates"}), Field: "candidates", Msg: "not a list of objects"}
	}
	for i, c := range cands {
		for _, k := range requiredCandidate {
			if _, ok := c[k]; !ok {
				return nil, missing(fmt.Sprintf("candidates[%d].%s", i, k), "candidates", i)
			}
		}
	}
	var rec record.Record
	if err := json.Unmarshal(data, &rec); err != nil {
		return nil, decodeError(name, data, err)
	}
	if err := check(&rec, name, data); err != nil {
		return nil, err
	}
	return &rec, nil
}

// check validates the values a trend relies on.
func check(r *record.Record, name string, data []byte) error {
	bad := func(field string, path []any, format string, args ...any) error {
		return &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineOf(data, path), Field: field, Msg: fmt.Sprintf(format, args...)}
	}
	if r.Format < 1 || r.Format > record.Format {
		return bad("format", []any{"format"}, "%d is not a record format this probity reads (1 to %d)", r.Format, record.Format)
	}
	if r.RecordID == "" {
		return bad("record_id", []any{"record_id"}, "empty")
	}
	if _, err := time.Parse("2006-01-02", r.Date); err != nil {
		return bad("date", []any{"date"}, "%q is not a date written YYYY-MM-DD", r.Date)
	}
	if err := checkPeriod(r.Period); err != nil {
		return &inputerr.Error{Err: errors.Join(ErrNotRecord, err), File: name, Line: lineOf(data, []any{"period"}), Field: "period", Msg: err.Error(),
			Hint: periodHint(r.Period)}
	}
	if !(r.Plan.Ceiling > 0 && r.Plan.Ceiling < 1) {
		return bad("plan.ceiling", []any{"plan", "ceiling"}, "%v is outside (0, 1)", r.Plan.Ceiling)
	}
	if !(r.Plan.Confidence > 0 && r.Plan.Confidence < 1) {
		return bad("plan.confidence", []any{"plan", "confidence"}, "%v is outside (0, 1)", r.Plan.Confidence)
	}
	for _, f := range []struct{ key, v string }{{"model", r.Plan.Model.String()}, {"method", r.Plan.Method.String()}, {"design", r.Plan.Design.String()}} {
		if f.v == "" {
			return bad("plan."+f.key, []any{"plan", f.key}, "empty")
		}
	}
	if err := checkPlanRule(r.Plan, planText(data)); err != nil {
		e, _ := inputerr.As(err)
		return &inputerr.Error{Err: errors.Join(ErrNotRecord, plan.ErrPlanFile), File: name, Line: lineOf(data, []any{"plan", e.Field}), Field: "plan." + e.Field,
			Msg: e.Msg, Hint: "the record's rule does not follow from its own inputs: the record was edited; chart the record.json written by 'probity record'"}
	}
	if len(r.Candidates) == 0 {
		return bad("candidates", []any{"candidates"}, "empty")
	}
	names := map[string]int{}
	for i, c := range r.Candidates {
		at := []any{"candidates", i}
		field := func(k string) string { return fmt.Sprintf("candidates[%d].%s", i, k) }
		if c.Name == "" {
			return bad(field("name"), at, "empty")
		}
		if j, dup := names[c.Name]; dup {
			return bad(field("name"), at, "%q repeats candidates[%d]", c.Name, j)
		}
		names[c.Name] = i
		if c.Labeled < 0 {
			return bad(field("labeled"), at, "%d is negative", c.Labeled)
		}
		if c.Errors < 0 || c.Errors > c.Labeled {
			return bad(field("errors"), at, "%d is outside [0, labeled = %d]", c.Errors, c.Labeled)
		}
		if !(c.Estimate >= 0 && c.Estimate <= 1) {
			return bad(field("estimate"), at, "%v is outside [0, 1]", c.Estimate)
		}
		if !(c.UpperBound >= 0 && c.UpperBound <= 1) {
			return bad(field("upper_bound"), at, "%v is outside [0, 1]", c.UpperBound)
		}
		if c.Verdict != record.Accept && c.Verdict != record.Reject {
			return bad(field("verdict"), at, "%q is neither %s nor %s", c.Verdict, record.Accept, record.Reject)
		}
	}
	if r.OverallVerdict != record.Accept && r.OverallVerdict != record.Reject {
		return bad("overall_verdict", []any{"overall_verdict"}, "%q is neither %s nor %s", r.OverallVerdict, record.Accept, record.Reject)
	}
	return nil
}

// checkPlanRule verifies the rule a record states against the inputs it
// states (plan.CheckStatedRule): a record whose sample size, acceptance
// number or risks were edited is not charted.
func checkPlanRule(p record.PlanInfo, text func(string) string) error {
	in := plan.Inputs{Ceiling: p.Ceiling, Confidence: p.Confidence, CandidateCount: p.CandidateCount, Anticipated: p.Anticipated,
		Population: p.Population, Method: p.Method, Multiplicity: p.Multiplicity, Design: p.Design, Require: p.Require}
	r := plan.Rule{Model: p.Model, SampleSize: p.SampleSize, AcceptanceNumber: p.AcceptanceNumber, PerCandidateRisk: p.PerCandidateRisk,
		ConsumerRisk: p.ConsumerRisk, ProducerRisk: p.ProducerRisk}
	return plan.CheckStatedRule(in, r, text)
}

// planText returns the text of a key of the record's plan section, as
// the file writes it.
func planText(data []byte) func(string) string {
	var top struct {
		Plan map[string]json.RawMessage `json:"plan"`
	}
	_ = json.Unmarshal(data, &top) // Decode has read it already
	return func(key string) string { return string(top.Plan[key]) }
}

// decodeError turns an encoding/json error into an input error with a line.
func decodeError(name string, data []byte, err error) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	var ie *inputerr.Error
	switch {
	case len(bytes.TrimSpace(data)) == 0:
		return &inputerr.Error{Err: ErrNotRecord, File: name, Msg: "is empty", Hint: "trend reads the record.json files written by 'probity record'"}
	case errors.As(err, &se):
		return &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineAt(data, se.Offset), Msg: "is not valid JSON: " + se.Error(),
			Hint: "trend reads the record.json files written by 'probity record'"}
	case errors.As(err, &te):
		field := te.Field
		if field == "" {
			return &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineAt(data, te.Offset), Msg: "is not a record: the top level is a JSON " + te.Value + ", not an object"}
		}
		kind := te.Type.Kind().String()
		if reflect.PointerTo(te.Type).Implements(reflect.TypeFor[encoding.TextUnmarshaler]()) {
			kind = "string" // a setting, written by its name
		}
		return &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineAt(data, te.Offset), Field: field,
			Msg: fmt.Sprintf("a JSON %s where a %s belongs", te.Value, jsonKind(kind))}
	case errors.As(err, &ie):
		// a setting whose name is not one of its values
		path := []any{"plan", ie.Field}
		if ie.Field == "bound" {
			path = []any{"method", "bound"}
		}
		return &inputerr.Error{Err: ErrNotRecord, File: name, Line: lineOf(data, path), Field: fmt.Sprintf("%s.%s", path...), Msg: ie.Msg}
	}
	return &inputerr.Error{Err: ErrNotRecord, File: name, Msg: "is not valid JSON: " + err.Error()}
}

func jsonKind(goKind string) string {
	switch goKind {
	case "int", "int64", "float64":
		return "number"
	case "string":
		return "string"
	case "slice":
		return "list"
	case "struct", "map":
		return "object"
	case "bool":
		return "boolean"
	}
	return goKind
}

// lineAt is the 1-based line holding byte offset off of data.
func lineAt(data []byte, off int64) int {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	if off < 0 {
		off = 0
	}
	return 1 + bytes.Count(data[:off], []byte("\n"))
}

// lineOf returns the line where the value at path starts (path elements are
// object keys (string) and list indices (int)); 1 for the empty path and 0
// when the path is not in data.
func lineOf(data []byte, path []any) int {
	if len(path) == 0 {
		return 0
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	off, ok := locate(dec, path)
	if !ok {
		return 0
	}
	// Skip the separator and whitespace before the value.
	for off < int64(len(data)) && strings.ContainsRune(" \t\r\n:,", rune(data[off])) {
		off++
	}
	return lineAt(data, off)
}

// locate walks the value the decoder is at and returns the input offset just
// before the value at path.
func locate(dec *json.Decoder, path []any) (int64, bool) {
	tok, err := dec.Token()
	if err != nil {
		return 0, false
	}
	d, ok := tok.(json.Delim)
	if !ok || (d != '{' && d != '[') {
		return 0, false
	}
	for i := 0; dec.More(); i++ {
		var hit bool
		if d == '{' {
			kt, err := dec.Token()
			if err != nil {
				return 0, false
			}
			key, _ := kt.(string)
			hit = path[0] == any(key)
		} else {
			hit = path[0] == any(i)
		}
		if hit {
			off := dec.InputOffset()
			if len(path) == 1 {
				return off, true
			}
			return locate(dec, path[1:])
		}
		var skip json.RawMessage
		if err := dec.Decode(&skip); err != nil {
			return 0, false
		}
	}
	return 0, false
}
