package main

import (
	"bytes"
	"compress/gzip"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/sampling/loggen"
)

// TestCheckAgainstAnotherLog (issue 16, item 7): checking a draw against
// the same rows in another format says "this is not the log the draw was
// made from" (it failed with a JSON parse error), and against the same log
// compressed again it passes, noting the recompression (it failed with
// "the draw folder is not what chance picked"): the manifest fingerprints
// the decompressed content too.
func TestCheckAgainstAnotherLog(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	jsonl := writeGenLog(t, dir, "log.jsonl.gz", loggen.Config{Rows: 3000, Seed: 21, Format: "jsonl", Gzip: true})
	tsv := writeGenLog(t, dir, "log.tsv.gz", loggen.Config{Rows: 3000, Seed: 21, Format: "tsv", Gzip: true})
	out := filepath.Join(dir, "draw")
	if code, _, stderr := runDrawCmd(t, nil, "--plan", drawPlan, "--log", jsonl, "--out", out, "--strata", "region"); code != exitOK {
		t.Fatal(stderr)
	}
	// The same rows as TSV.
	code, stdout, stderr := runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", tsv)
	if code != exitRejected || !strings.Contains(stdout, "this is not the log the draw was made from: its name says tsv, but the draw read "+jsonl+" (jsonl, gzip)") {
		t.Fatalf("TSV copy: exit %d\n%s%s", code, stdout, stderr)
	}
	// The TSV copy under a name that says nothing: read as the draw's log
	// was, it is not JSON Lines.
	plain := filepath.Join(dir, "copy.gz")
	data, _ := os.ReadFile(tsv)
	os.WriteFile(plain, data, 0o644)
	code, stdout, _ = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", plain)
	if code != exitRejected || !strings.Contains(stdout, "this is not the log the draw was made from: it cannot be read as the draw's log "+jsonl+" (jsonl, gzip) was") {
		t.Fatalf("TSV copy, unnamed: exit %d\n%s", code, stdout)
	}
	// The same log compressed again, at another level.
	zr, err := gzip.NewReader(bytes.NewReader(mustRead(t, jsonl)))
	if err != nil {
		t.Fatal(err)
	}
	var again bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&again, gzip.BestCompression)
	if _, err := again.ReadFrom(zr); err != nil {
		t.Fatal(err)
	}
	raw := again.Bytes()
	again = bytes.Buffer{}
	zw.Reset(&again)
	zw.Write(raw)
	zw.Close()
	recompressed := filepath.Join(dir, "again.jsonl.gz")
	os.WriteFile(recompressed, again.Bytes(), 0o644)
	code, stdout, stderr = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", recompressed)
	if code != exitOK || !strings.Contains(stdout, "note: the log was compressed again since the draw: the same content") || !strings.Contains(stdout, "same: ") {
		t.Fatalf("recompressed: exit %d\n%s%s", code, stdout, stderr)
	}
	// The uncompressed log is the same content too.
	unzipped := filepath.Join(dir, "log.jsonl")
	os.WriteFile(unzipped, raw, 0o644)
	if code, stdout, stderr = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", unzipped); code != exitOK {
		t.Fatalf("decompressed: exit %d\n%s%s", code, stdout, stderr)
	}
	// Another log of the same format is not the draw's.
	other := writeGenLog(t, dir, "other.jsonl.gz", loggen.Config{Rows: 3000, Seed: 22, Format: "jsonl", Gzip: true})
	code, stdout, _ = runDrawCmd(t, nil, "--check", out, "--plan", drawPlan, "--log", other)
	if code != exitRejected || !strings.Contains(stdout, "this is not the log the draw was made from: its content's SHA-256 is") {
		t.Fatalf("other log: exit %d\n%s", code, stdout)
	}
}
