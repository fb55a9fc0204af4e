package plan

import (
	"encoding"
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"gopkg.in/yaml.v3"

	"probity/plan/inputerr"
)

// settingCase is one setting type: its values in order, their names in
// plan.yaml and record.json (which must never change: the golden files
// hold them), and a parser.
type settingCase struct {
	field   string
	values  []fmt.Stringer
	names   []string
	parse   func(string) (fmt.Stringer, error)
	unset   encoding.TextUnmarshaler // a fresh zero value to decode into
	allowed string
}

func settingCases() []settingCase {
	return []settingCase{
		{
			field: "multiplicity", names: []string{"bonferroni", "holm", "fixed-sequence"},
			values: []fmt.Stringer{Bonferroni, Holm, FixedSequence},
			parse:  func(s string) (fmt.Stringer, error) { return ParseMultiplicity(s) },
			unset:  new(Multiplicity), allowed: "one of bonferroni, holm, fixed-sequence",
		},
		{
			field: "design", names: []string{"fixed", "sequential"},
			values: []fmt.Stringer{DesignFixed, DesignSequential},
			parse:  func(s string) (fmt.Stringer, error) { return ParseDesign(s) },
			unset:  new(Design), allowed: "fixed or sequential",
		},
		{
			field: "require", names: []string{"all", "any"},
			values: []fmt.Stringer{RequireAll, RequireAny},
			parse:  func(s string) (fmt.Stringer, error) { return ParseRequire(s) },
			unset:  new(Require), allowed: "all or any",
		},
		{
			field: "method", names: []string{"exact", "hoeffding", "kl"},
			values: []fmt.Stringer{MethodExact, MethodHoeffding, MethodKL},
			parse:  func(s string) (fmt.Stringer, error) { return ParseMethod(s) },
			unset:  new(Method), allowed: "one of exact, hoeffding, kl",
		},
		{
			field: "model", names: []string{"binomial", "hypergeometric", "hoeffding", "kl"},
			values: []fmt.Stringer{ModelBinomial, ModelHypergeometric, ModelHoeffding, ModelKL},
			parse:  func(s string) (fmt.Stringer, error) { return ParseModel(s) },
			unset:  new(Model), allowed: "one of binomial, hypergeometric, hoeffding, kl",
		},
		{
			field: "bound", names: []string{"clopper-pearson", "exact-hypergeometric", "hoeffding", "kl",
				"korn-graubard (approximate)", "weighted-hoeffding",
				"sequential boundaries (stage-wise exact bound)", "sequential boundaries (bound descriptive)", "stratified-count"},
			values: []fmt.Stringer{BoundClopperPearson, BoundExactHypergeometric, BoundHoeffding, BoundChernoff,
				BoundKornGraubard, BoundWeightedHoeffding, BoundSequential, BoundSequentialLot, BoundStratifiedCount},
			parse: func(s string) (fmt.Stringer, error) { return ParseBound(s) },
			unset: new(Bound),
			allowed: "one of clopper-pearson, exact-hypergeometric, hoeffding, kl, korn-graubard (approximate), weighted-hoeffding, " +
				"sequential boundaries (stage-wise exact bound), sequential boundaries (bound descriptive), stratified-count",
		},
	}
}

// TestSettingSpelling: every value's name is the spelling the files have
// always used (common practice, no source: the file format), parsing
// reads it back, and anything else is refused with an input error naming
// the field.
func TestSettingSpelling(t *testing.T) {
	for _, sc := range settingCases() {
		for i, v := range sc.values {
			if v.String() != sc.names[i] {
				t.Errorf("%s value %d is spelled %q, want %q", sc.field, i+1, v.String(), sc.names[i])
			}
			got, err := sc.parse(sc.names[i])
			if err != nil || got != v {
				t.Errorf("parse %s %q = %v, %v", sc.field, sc.names[i], got, err)
			}
			text, err := v.(encoding.TextMarshaler).MarshalText()
			if err != nil || string(text) != sc.names[i] {
				t.Errorf("%s %v marshals to %q, %v", sc.field, v, text, err)
			}
		}
		for _, bad := range []string{"", "x", strings.ToUpper(sc.names[0]), " " + sc.names[0]} {
			_, err := sc.parse(bad)
			ie, ok := inputerr.As(err)
			if !ok || ie.Field != sc.field || ie.Msg != fmt.Sprintf("%q: must be %s", bad, sc.allowed) {
				t.Errorf("parse %s %q: error %v, want an InputError on %s allowing %s", sc.field, bad, err, sc.field, sc.allowed)
			}
		}
		// a file may leave a setting empty: it decodes to the zero value
		if err := sc.unset.UnmarshalText(nil); err != nil {
			t.Errorf("%s: empty text refused: %v", sc.field, err)
		}
		if s := sc.unset.(fmt.Stringer).String(); s != "" {
			t.Errorf("%s: unset value is spelled %q", sc.field, s)
		}
		if err := sc.unset.UnmarshalText([]byte("nonsense")); err == nil {
			t.Errorf("%s: unknown name decoded", sc.field)
		}
	}
}

// TestSettingEncodings: a struct of settings encodes to the same YAML and
// JSON as the strings it replaced, and decodes back.
func TestSettingEncodings(t *testing.T) {
	type typed struct {
		M Multiplicity `yaml:"multiplicity" json:"multiplicity"`
		U Multiplicity `yaml:"unset" json:"unset"`
	}
	type plain struct {
		M string `yaml:"multiplicity" json:"multiplicity"`
		U string `yaml:"unset" json:"unset"`
	}
	v := typed{M: FixedSequence}
	s := plain{M: "fixed-sequence"}
	for _, enc := range []struct {
		name      string
		marshal   func(any) ([]byte, error)
		unmarshal func([]byte, any) error
	}{{"yaml", yaml.Marshal, yaml.Unmarshal}, {"json", json.Marshal, json.Unmarshal}} {
		a, err := enc.marshal(v)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := enc.marshal(s)
		if string(a) != string(b) {
			t.Errorf("%s: typed settings encode as\n%s\nstrings as\n%s", enc.name, a, b)
		}
		var back typed
		if err := enc.unmarshal(a, &back); err != nil || back != v {
			t.Errorf("%s: decoded %+v, %v; want %+v", enc.name, back, err, v)
		}
	}
	if _, err := json.Marshal(typed{M: Multiplicity(42)}); err == nil {
		t.Error("an undefined multiplicity was encoded")
	}
}

func TestMultiplicityWording(t *testing.T) {
	for _, tc := range []struct {
		m              Multiplicity
		title, reached string
	}{
		{Bonferroni, "Bonferroni", ""},
		{Holm, "Holm step-down", "not reached: Holm's step-down stopped at a"},
		{FixedSequence, "fixed-sequence", "not reached: a was rejected earlier in the fixed sequence"},
		{MultiplicityUnset, "", ""},
	} {
		if got := tc.m.Title(); got != tc.title {
			t.Errorf("%v.Title() = %q, want %q", tc.m, got, tc.title)
		}
		if got := tc.m.NotReachedReason("a"); got != tc.reached {
			t.Errorf("%v.NotReachedReason = %q, want %q", tc.m, got, tc.reached)
		}
	}
	// δ/M': the union bound divides, the fixed sequence does not (common
	// practice, no source); exact in floating point.
	for _, tc := range []struct {
		m    Multiplicity
		want float64
	}{{Bonferroni, 0.05 / 4}, {Holm, 0.05 / 4}, {FixedSequence, 0.05}, {MultiplicityUnset, 0.05 / 4}} {
		if got := tc.m.PerCandidateRisk(0.05, 4); got != tc.want {
			t.Errorf("%v.PerCandidateRisk(0.05, 4) = %v, want %v", tc.m, got, tc.want)
		}
	}
}

func TestDesignTitle(t *testing.T) {
	for d, want := range map[Design]string{
		DesignFixed: "fixed sample", DesignUnset: "fixed sample",
		DesignSequential: "sequential (stops when a boundary is reached)",
	} {
		if got := d.Title(); got != want {
			t.Errorf("%v.Title() = %q, want %q", d, got, want)
		}
	}
}

// TestRequireMet: any needs one accepted candidate, all (and unset) every
// one; checked against the definition for every count up to 4.
func TestRequireMet(t *testing.T) {
	for total := 0; total <= 4; total++ {
		for acc := 0; acc <= total; acc++ {
			for r, want := range map[Require]bool{RequireAny: acc >= 1, RequireAll: acc == total, RequireUnset: acc == total} {
				if got := r.Met(acc, total); got != want {
					t.Errorf("%q.Met(%d, %d) = %v, want %v", r, acc, total, got, want)
				}
			}
		}
	}
	if RequireAny.Title() != "at least one candidate must be accepted" || RequireUnset.Title() != "every candidate must be accepted" {
		t.Errorf("titles %q, %q", RequireAny.Title(), RequireUnset.Title())
	}
}

// TestMethodComparisonRule: each method is sized by its own comparison row
// (the exact one by the lot's model).
func TestMethodComparisonRule(t *testing.T) {
	for _, tc := range []struct {
		m          Method
		population int64
		want       string
	}{
		{MethodExact, 0, RuleExactBinomial}, {MethodExact, 5000, RuleExactHypergeometric},
		{MethodUnset, 0, RuleExactBinomial}, {MethodHoeffding, 5000, RuleHoeffding}, {MethodKL, 0, RuleKL},
	} {
		if got := tc.m.ComparisonRule(tc.population); got != tc.want {
			t.Errorf("%q.ComparisonRule(%d) = %s, want %s", tc.m, tc.population, got, tc.want)
		}
	}
}

// TestMethodModel: the model behind each method's risks, as plan files
// have always recorded it.
func TestMethodModel(t *testing.T) {
	for _, tc := range []struct {
		m          Method
		population int64
		want       Model
	}{
		{MethodExact, 0, ModelBinomial}, {MethodExact, 5000, ModelHypergeometric}, {MethodUnset, 5000, ModelHypergeometric},
		{MethodHoeffding, 5000, ModelHoeffding}, {MethodKL, 0, ModelKL},
	} {
		if got := tc.m.Model(tc.population); got != tc.want {
			t.Errorf("%q.Model(%d) = %q, want %q", tc.m, tc.population, got, tc.want)
		}
	}
}

// TestBoundProperties: the words and kinds of each bound as the record and
// the PDF have always shown them.
func TestBoundProperties(t *testing.T) {
	for _, tc := range []struct {
		b                            Bound
		title                        string
		weighted, exact, approximate bool
	}{
		{BoundClopperPearson, "Clopper–Pearson (exact binomial)", false, true, false},
		{BoundExactHypergeometric, "exact hypergeometric", false, true, false},
		{BoundHoeffding, "Hoeffding", false, false, false},
		{BoundChernoff, "Chernoff (Kullback–Leibler)", false, false, false},
		{BoundKornGraubard, "Korn–Graubard", true, false, true},
		{BoundWeightedHoeffding, "weighted Hoeffding", true, false, false},
		{BoundSequential, "sequential boundaries (stage-wise exact bound)", false, false, false},
		{BoundSequentialLot, "sequential boundaries (bound descriptive)", false, false, true},
		{BoundStratifiedCount, "stratified count rule", true, true, false},
		{BoundUnset, "", false, false, false},
	} {
		if tc.b.Title() != tc.title || tc.b.Weighted() != tc.weighted || tc.b.Exact() != tc.exact || tc.b.Approximate() != tc.approximate {
			t.Errorf("%q: title %q weighted %v exact %v approximate %v", tc.b, tc.b.Title(), tc.b.Weighted(), tc.b.Exact(), tc.b.Approximate())
		}
	}
}
