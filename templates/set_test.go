package templates

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestEmbeddedSetLoadsAndFillsIn(t *testing.T) {
	s, err := Load("")
	if err != nil {
		t.Fatal(err)
	}
	for _, u := range Uses() {
		c, err := s.Caution(u)
		if err != nil {
			t.Fatalf("Caution(%s): %v", u, err)
		}
		if len(Blocks(c)) == 0 {
			t.Errorf("caution for %s is empty", u)
		}
	}
	for _, name := range []string{Method, Assumptions, DecisionRule, Scope, DeviationsNone, DeviationsIncomplete, SignoffIntro} {
		for _, f := range []Fields{sampleFields(), {}} {
			text, err := s.Text(name, f)
			if err != nil {
				t.Fatalf("Text(%s): %v", name, err)
			}
			if strings.Contains(text, "{{") || strings.Contains(text, "<no value>") {
				t.Errorf("%s left a placeholder: %q", name, text)
			}
		}
	}
	for _, r := range Roles() {
		m, err := s.SignatureMeaning(r, Fields{})
		if err != nil || strings.TrimSpace(m) == "" {
			t.Errorf("SignatureMeaning(%s) = %q, %v", r, m, err)
		}
	}
	if len(s.Overridden()) != 0 {
		t.Errorf("embedded set reports overrides %v", s.Overridden())
	}
}

// The wording the record must carry, pinned by the issue (common practice
// for these statements, no source beyond the issue text).
func TestRequiredSentences(t *testing.T) {
	s, err := Load("")
	if err != nil {
		t.Fatal(err)
	}
	f := sampleFields()
	scope, _ := s.Text(Scope, f)
	if !strings.Contains(scope, "results apply only to the population and period sampled") {
		t.Errorf("scope statement lacks the pinned sentence: %q", scope)
	}
	for _, use := range []string{"safety", "medical", "vehicle"} {
		c, _ := s.Caution(use)
		for _, want := range []string{"does not replace", "regulat", "qualified and licensed", "local codes and standards"} {
			if !strings.Contains(c, want) {
				t.Errorf("caution-%s.md lacks %q", use, want)
			}
		}
		if !SafetyRelevant(use) {
			t.Errorf("%s should be safety-relevant", use)
		}
	}
	credit, _ := s.Caution("credit")
	for _, want := range []string{"Fair-lending", "anti-discrimination", "authorities", "qualified"} {
		if !strings.Contains(credit, want) {
			t.Errorf("caution-credit.md lacks %q", want)
		}
	}
	emp, _ := s.Caution("employment")
	for _, want := range []string{"Anti-discrimination", "authorities", "qualified"} {
		if !strings.Contains(emp, want) {
			t.Errorf("caution-employment.md lacks %q", want)
		}
	}
	rule, _ := s.Text(DecisionRule, f)
	for _, want := range []string{"False-accept risk", f.PerCandidateRisk, f.Ceiling, "ACCEPT", "REJECT"} {
		if !strings.Contains(rule, want) {
			t.Errorf("decision rule lacks %q: %q", want, rule)
		}
	}
	if _, err := s.Caution("casino"); err == nil {
		t.Error("Caution accepted an unknown use")
	}
}

func write(t *testing.T, dir, name, text string) {
	t.Helper()
	if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestOverrideFileByFile(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, "caution-credit.md", "Branch 7 wording: ask the duty credit officer.\n")
	write(t, dir, "scope.md", "Only {{.System}} in {{.Period}}.\n")
	write(t, dir, ".notes", "ignored")
	s, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	c, _ := s.Caution("credit")
	if c != "Branch 7 wording: ask the duty credit officer.\n" {
		t.Errorf("credit caution not overridden: %q", c)
	}
	emb, _ := Load("")
	g1, _ := s.Caution("general")
	g2, _ := emb.Caution("general")
	if g1 != g2 {
		t.Error("a file missing from the override directory did not fall back to the embedded one")
	}
	scope, err := s.Text(Scope, Fields{System: "triage-v2", Period: "2026-10"})
	if err != nil || scope != "Only triage-v2 in 2026-10.\n" {
		t.Errorf("scope = %q, %v", scope, err)
	}
	if got := strings.Join(s.Overridden(), ","); got != "caution-credit.md,scope.md" {
		t.Errorf("Overridden = %s", got)
	}
	if s.Fingerprint() == emb.Fingerprint() {
		t.Error("fingerprint did not change with the wording")
	}
	again, _ := Load("")
	if again.Fingerprint() != emb.Fingerprint() {
		t.Error("fingerprint of the embedded set is not stable")
	}
}

func TestBadOverrideIsRefusedNamingTheFile(t *testing.T) {
	cases := []struct {
		name, file, text, want string
	}{
		{"unknown file", "caution-casino.md", "x", "is not a template file name"},
		{"misspelt field", "method.md", "n =\n{{.SampelSize}}", "cannot be filled in: line 2: {{.SampelSize}} is not a known field"},
		{"field only in else branch", "scope.md", "{{if .Period}}p{{else}}{{.Nope}}{{end}}", "{{.Nope}} is not a known field"},
		{"unclosed action", "decision-rule.md", "{{if .Ceiling}} no end", "does not parse: line 1: unexpected EOF"},
		{"empty caution", "caution-safety.md", "\n\n  \n", "is empty"},
		{"not UTF-8", "signoff-approved.md", "caf\xe9", "UTF-8"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			write(t, dir, tc.file, tc.text)
			_, err := Load(dir)
			if err == nil {
				t.Fatal("accepted")
			}
			if !errors.Is(err, ErrTemplate) {
				t.Errorf("error %v does not wrap ErrTemplate", err)
			}
			path := filepath.Join(dir, tc.file)
			if !strings.HasPrefix(err.Error(), path+": ") || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q should start with %q and mention %q", err, path, tc.want)
			}
		})
	}
	t.Run("subdirectory", func(t *testing.T) {
		dir := t.TempDir()
		if err := os.Mkdir(filepath.Join(dir, "cautions"), 0o755); err != nil {
			t.Fatal(err)
		}
		_, err := Load(dir)
		if err == nil || !strings.Contains(err.Error(), "cautions: is a directory") {
			t.Errorf("err = %v", err)
		}
	})
	t.Run("missing directory", func(t *testing.T) {
		_, err := Load(filepath.Join(t.TempDir(), "nope"))
		if err == nil || !strings.Contains(err.Error(), "nope") {
			t.Errorf("err = %v", err)
		}
	})
}

// TestGuttedTemplatesRefused: wording that drops what the record's promise
// rests on is refused, naming the file and what is missing — the decision
// rule without its numbers, a safety-relevant caution without its
// deferral, a signature meaning that names the record id.
func TestGuttedTemplatesRefused(t *testing.T) {
	cases := []struct {
		file, text, want string
	}{
		{"decision-rule.md", "The model is accepted.\n",
			"decision-rule.md: does not state the ceiling ({{.Ceiling}}) for a fixed plan; the decision rule must state the numeric rule with the ceiling and the confidence"},
		{"decision-rule.md", "Accepted when the {{.BoundConfidence}} bound is below {{.Ceiling}}.\n",
			"does not state the number of decisions labeled ({{.SampleSize}}) for a fixed plan"},
		{"decision-rule.md", "{{.SampleSize}} labeled; accepted when the {{.BoundConfidence}} bound is below {{.Ceiling}}.\n",
			"does not state the acceptance number ({{.AcceptanceNumber}}) for a fixed plan"},
		{"decision-rule.md", "{{if .Sequential}}Sequential.{{else}}{{.SampleSize}} labeled, at most {{.AcceptanceNumber}} errors; the {{.BoundConfidence}} bound is below {{.Ceiling}}.{{end}}\n",
			"does not state the ceiling ({{.Ceiling}}) for a sequential plan"},
		{"decision-rule.md", "{{if gt .Candidates 1}}All fine.{{else}}{{.SampleSize}} labeled, at most {{.AcceptanceNumber}} errors; the {{.BoundConfidence}} bound is below {{.Ceiling}}.{{end}}\n",
			"for three candidates under bonferroni"},
		{"caution-safety.md", "No special cautions apply.\n", "caution-safety.md: lacks the deferral to the applicable codes and standards"},
		{"caution-medical.md", "Defer to local codes. Ask the regulator.\n", "caution-medical.md: lacks the review by licensed professionals"},
		{"caution-vehicle.md", "Defer to local codes. Licensed engineers review it.\n", "caution-vehicle.md: lacks the regulator"},
		{"signoff-approved.md", "I approve record {{.RecordID}}.\n", "signoff-approved.md: prints the record id"},
	}
	for _, c := range cases {
		dir := t.TempDir()
		write(t, dir, c.file, c.text)
		_, err := Load(dir)
		if !errors.Is(err, ErrTemplate) || !strings.Contains(err.Error(), filepath.Join(dir, c.want)) && !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s %q: got %v, want %q", c.file, c.text, err, c.want)
		}
	}
	// Reworded but complete wording is accepted.
	dir := t.TempDir()
	write(t, dir, "caution-safety.md", "Our site rules first. We defer to the applicable codes; the regulator and licensed engineers decide.\n")
	write(t, dir, "decision-rule.md", "{{.SampleSize}} decisions{{if not (or .Sequential .Weighted)}}, at most {{.AcceptanceNumber}} errors{{end}}; accepted when the {{.BoundConfidence}} upper bound is below {{.Ceiling}}.\n")
	if _, err := Load(dir); err != nil {
		t.Errorf("complete reworded wording refused: %v", err)
	}
}
