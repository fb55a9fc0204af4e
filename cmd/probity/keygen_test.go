package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/record/signature"
)

func TestKeygenWritesAPairAndNeverOverwrites(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	name := filepath.Join(dir, "audit-key")
	code, stdout, stderr := runProbity(t, "keygen", "--out", name)
	if code != exitOK || stderr != "" {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	st, err := os.Stat(name)
	if err != nil || st.Mode().Perm() != 0o600 {
		t.Fatalf("private key mode %v (%v), want 0600", st.Mode().Perm(), err)
	}
	priv, err := signature.ParsePrivate(mustRead(t, name), name)
	if err != nil {
		t.Fatal(err)
	}
	pub, err := signature.ParsePublic(mustRead(t, name+".pub"), name+".pub")
	if err != nil || !pub.Equal(priv.Public()) {
		t.Fatalf("public key does not match the private key: %v", err)
	}
	if !strings.Contains(stdout, "fingerprint: "+signature.Fingerprint(pub)) {
		t.Errorf("stdout %q", stdout)
	}
	before := mustRead(t, name)
	for _, existing := range []string{name, filepath.Join(dir, "other")} {
		if existing != name {
			writeFile(t, existing+".pub", []byte("keep"))
		}
		code, _, stderr = runProbity(t, "keygen", "--out", existing)
		if code != exitBadInput || !strings.Contains(stderr, "already exists; keygen never overwrites a key") {
			t.Errorf("%s: exit %d: %s", existing, code, stderr)
		}
	}
	if string(mustRead(t, name)) != string(before) {
		t.Errorf("the private key was overwritten")
	}
	if _, err := os.Stat(filepath.Join(dir, "other")); err == nil {
		t.Errorf("a private key was written beside an existing public key")
	}
	if code, _, stderr := runProbity(t, "keygen"); code != exitBadInput || !strings.Contains(stderr, "--out is required") {
		t.Errorf("no --out: exit %d: %s", code, stderr)
	}
}
