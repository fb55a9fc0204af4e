package sampling

import (
	"bytes"
	"strings"
	"testing"

	"probity/sampling/drawfolder"
)

// TestIDsAreBytes: a record id that is not valid UTF-8 is refused with
// its line in every log format (before, JSON Lines turned "\xff" and
// "\xfe" both into U+FFFD: the worksheet showed an id that is not in the
// log, and two distinct ids were taken for one repeated id).
func TestIDsAreBytes(t *testing.T) {
	logs := map[string]string{
		"log.csv":   "record_id,model_a,score\na1,ok,0.1\nb\xff,ok,0.2\nb\xfe,ok,0.3\n",
		"log.tsv":   "record_id\tmodel_a\tscore\na1\tok\t0.1\nb\xff\tok\t0.2\nb\xfe\tok\t0.3\n",
		"log.jsonl": "{\"record_id\":\"a1\",\"model_a\":\"ok\",\"score\":0.1}\n{\"record_id\":\"b\xff\",\"model_a\":\"ok\",\"score\":0.2}\n{\"record_id\":\"b\xfe\",\"model_a\":\"ok\",\"score\":0.3}\n",
	}
	for name, log := range logs {
		for _, dedupe := range []bool{false, true} {
			_, err := Draw(DrawInput{Plan: testPlan("u", 1), LogPath: name, Log: strings.NewReader(log), Dedupe: dedupe})
			line := 3
			if strings.HasSuffix(name, ".jsonl") {
				line = 2
			}
			want := name + " line " + string(rune('0'+line)) + `, field record_id: the record id "b\xff" is not valid UTF-8 (byte 0xff at byte 2)`
			if err == nil || err.Error() != want {
				t.Errorf("%s (dedupe %v): error\n %v\nwant\n %s", name, dedupe, err, want)
			}
		}
	}
}

// TestJSONStringsKeptExactly: JSON Lines strings are decoded to exactly
// the bytes they stand for: an escaped id is the same id (and key) as
// the same characters in CSV, bytes that are not UTF-8 in a shown value
// reach the worksheet as they are (as from CSV), and an escape that names
// no character is refused with its line.
func TestJSONStringsKeptExactly(t *testing.T) {
	csv := "record_id,model_a,score,text\n\xc3\xa9t\xc3\xa9,ok,0.1,caf\xe9\n"
	jsonl := "{\"record_id\":\"\\u00e9t\\u00e9\",\"model_a\":\"ok\",\"score\":0.1,\"text\":\"caf\xe9\"}\n"
	draw := func(name, log string) *drawfolder.Content {
		t.Helper()
		f, err := Draw(DrawInput{Plan: testPlan("j", 1), LogPath: name, Log: strings.NewReader(log), Show: []string{"text"}})
		if err != nil {
			t.Fatal(err)
		}
		return f
	}
	a, b := draw("log.csv", csv), draw("log.jsonl", jsonl)
	if a.Ledger[0].Key != b.Ledger[0].Key || a.Worksheet[0].RecordID != "été" {
		t.Fatalf("keys %s and %s, id %q", a.Ledger[0].Key, b.Ledger[0].Key, a.Worksheet[0].RecordID)
	}
	if !bytes.Equal([]byte(b.Worksheet[0].Show[0]), []byte("caf\xe9")) || a.Worksheet[0].Show[0] != b.Worksheet[0].Show[0] {
		t.Fatalf("shown value %q from JSON Lines, %q from CSV", b.Worksheet[0].Show[0], a.Worksheet[0].Show[0])
	}
	bad := "{\"record_id\":\"a\",\"model_a\":\"ok\",\"score\":0.1}\n{\"record_id\":\"x\\ud800y\",\"model_a\":\"ok\",\"score\":0.1}\n"
	_, err := Draw(DrawInput{Plan: testPlan("j", 1), LogPath: "log.jsonl", Log: strings.NewReader(bad)})
	want := `log.jsonl line 2, field record_id: key "record_id": \ud800 is half of a UTF-16 surrogate pair, not a character`
	if err == nil || err.Error() != want {
		t.Fatalf("error\n %v\nwant\n %s", err, want)
	}
}

// TestUnquoteJSON checks the string decoder against encoding/json's
// reading of valid strings (RFC 8259 §7 examples and escapes).
func TestUnquoteJSON(t *testing.T) {
	cases := []struct{ in, want string }{
		{`""`, ""},
		{`"plain"`, "plain"},
		{`"a\"b\\c\/d\be\ff\ng\rh\ti"`, "a\"b\\c/d\be\ff\ng\rh\ti"},
		{`"\u0041\u00e9\u20ac"`, "Aé€"},
		{`"\ud834\udd1e"`, "\U0001D11E"}, // RFC 8259 §7: the G clef
		{"\"raw \xff bytes\"", "raw \xff bytes"},
	}
	for _, c := range cases {
		got, err := unquoteJSON(nil, []byte(c.in))
		if err != nil || string(got) != c.want {
			t.Errorf("unquoteJSON(%s) = %q, %v; want %q", c.in, got, err, c.want)
		}
	}
	for _, in := range []string{`"\udd1e"`, `"\ud834x"`, `"\ud834\u0041"`, `"\x"`, `"\u12"`, "\"a\x01\"", `"a\"`} {
		if got, err := unquoteJSON(nil, []byte(in)); err == nil {
			t.Errorf("unquoteJSON(%s) = %q, want an error", in, got)
		}
	}
}
