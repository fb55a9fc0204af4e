package sampling

import (
	"bytes"
	"errors"
	"testing"

	"probity/sampling/drawfolder"
	"probity/sampling/loggen"
)

// TestContentFingerprint: a log's content SHA-256 is that of its
// decompressed bytes, so the gzip of a log and the log itself share it
// (and an uncompressed log's content fingerprint is its file's).
func TestContentFingerprint(t *testing.T) {
	plain := genLog(t, loggen.Config{Rows: 2000, Seed: 31})
	zipped := genLog(t, loggen.Config{Rows: 2000, Seed: 31, Gzip: true})
	a, err := Draw(DrawInput{Plan: testPlan("c", 20), LogPath: "log.csv", Log: bytes.NewReader(plain)})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Draw(DrawInput{Plan: testPlan("c", 20), LogPath: "log.csv.gz", Log: bytes.NewReader(zipped)})
	if err != nil {
		t.Fatal(err)
	}
	la, lb := a.Manifest.Log, b.Manifest.Log
	if la.ContentSHA256 != la.SHA256 || lb.ContentSHA256 != la.SHA256 || lb.SHA256 == la.SHA256 {
		t.Fatalf("fingerprints: plain %s/%s, gzip %s/%s", la.SHA256, la.ContentSHA256, lb.SHA256, lb.ContentSHA256)
	}
	if same, why := drawfolder.SameLog(la, lb); !same || why == "" {
		t.Fatalf("SameLog(plain, gzip) = %v %q", same, why)
	}
	// Without a content fingerprint (an older manifest) only the file's
	// own digest can be compared.
	old := la
	old.ContentSHA256 = ""
	if same, _ := drawfolder.SameLog(old, lb); same {
		t.Fatal("an older manifest matched another file")
	}
}

// TestRedrawRefusesAnotherFormat: a log whose name says another format
// than the draw's log had, or that cannot be read as that log was, is not
// the log the draw was made from.
func TestRedrawRefusesAnotherFormat(t *testing.T) {
	jsonl := genLog(t, loggen.Config{Rows: 500, Seed: 32, Format: "jsonl"})
	tsv := genLog(t, loggen.Config{Rows: 500, Seed: 32, Format: "tsv"})
	f, err := Draw(DrawInput{Plan: testPlan("r", 10), LogPath: "log.jsonl", Log: bytes.NewReader(jsonl)})
	if err != nil {
		t.Fatal(err)
	}
	m := f.Manifest
	for name, log := range map[string][]byte{"log.tsv": tsv, "copy": tsv} {
		in, err := DrawInputFromManifest(m)
		if err != nil {
			t.Fatal(err)
		}
		in.Plan, in.LogPath, in.Log = testPlan("r", 10), name, bytes.NewReader(log)
		if _, err := Redraw(m, in); !errors.Is(err, ErrNotTheLog) {
			t.Errorf("%s: %v, want ErrNotTheLog", name, err)
		}
	}
}
