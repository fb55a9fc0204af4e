package sampling

import (
	"bytes"
	"fmt"
	"math"
	"path/filepath"
	"probity/plan/inputfile"
	"probity/sampling/drawfolder"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// ReadAnticipated reads the anticipated error p_h of each stratum for
// Neyman allocation, from a small CSV file with the columns stratum and
// anticipated_error, or a YAML (.yaml/.yml) mapping of stratum label to
// p_h. Every p_h must lie in (0, 1); a label may appear once.
func ReadAnticipated(path string) (map[string]float64, error) {
	data, err := inputfile.ReadFile(path, "file of anticipated errors", inputfile.SmallLimit)
	if err != nil {
		return nil, err
	}
	ext := strings.ToLower(filepath.Ext(path))
	if ext == ".yaml" || ext == ".yml" {
		return parseAnticipatedYAML(data, path)
	}
	return parseAnticipatedCSV(data, path)
}

func parseAnticipatedCSV(data []byte, name string) (map[string]float64, error) {
	t, err := drawfolder.ParseCSVTable(data, name)
	if err != nil {
		return nil, err
	}
	if err := drawfolder.CheckHeader(name, t.Header, []string{"stratum", "anticipated_error"}); err != nil {
		return nil, err
	}
	out := map[string]float64{}
	lines := map[string]int{}
	for i, rec := range t.Rows {
		line := t.Lines[i]
		if prev, ok := lines[rec[0]]; ok {
			return nil, inputErrorf(name, line, "stratum", "stratum %q is listed twice (lines %d and %d)", rec[0], prev, line)
		}
		lines[rec[0]] = line
		v, err := strconv.ParseFloat(strings.TrimSpace(rec[1]), 64)
		if err != nil || !(v > 0 && v < 1) {
			return nil, inputErrorf(name, line, "anticipated_error", "%q is not a number strictly between 0 and 1", rec[1])
		}
		out[rec[0]] = v
	}
	if len(out) == 0 {
		return nil, inputErrorf(name, 0, "", "no stratum is listed")
	}
	return out, nil
}

func parseAnticipatedYAML(data []byte, name string) (map[string]float64, error) {
	var doc yaml.Node
	if err := yaml.NewDecoder(bytes.NewReader(data)).Decode(&doc); err != nil {
		return nil, inputErrorf(name, 0, "", "not valid YAML: %v", err)
	}
	if len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		return nil, inputErrorf(name, 0, "", "expected a mapping of stratum label to anticipated error, e.g. \"north|web\": 0.02")
	}
	m := doc.Content[0]
	out := map[string]float64{}
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := m.Content[i], m.Content[i+1]
		if _, dup := out[k.Value]; dup {
			return nil, inputErrorf(name, k.Line, k.Value, "stratum %q is listed twice", k.Value)
		}
		p, err := strconv.ParseFloat(v.Value, 64)
		if v.Kind != yaml.ScalarNode || err != nil || !(p > 0 && p < 1) || math.IsNaN(p) {
			return nil, inputErrorf(name, v.Line, k.Value, "%q is not a number strictly between 0 and 1", v.Value)
		}
		out[k.Value] = p
	}
	if len(out) == 0 {
		return nil, inputErrorf(name, 0, "", "no stratum is listed")
	}
	return out, nil
}

// CheckAnticipated reports the first stratum (in label order) with no
// anticipated error; name is the file they were read from.
func CheckAnticipated(name string, p map[string]float64, labels []string) error {
	for _, l := range labels {
		if _, ok := p[l]; !ok {
			e := inputErrorf(name, 0, "", "no anticipated error for stratum %q", l)
			e.Hint = fmt.Sprintf("list every stratum of the draw; its labels are the strata values joined with |, e.g. %q", labels[0])
			return e
		}
	}
	return nil
}
