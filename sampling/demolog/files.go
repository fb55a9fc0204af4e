package demolog

import (
	"compress/gzip"
	"crypto/sha256"
	"encoding/binary"
	"io"
	"time"
)

// Clock is the scenario's "now": the demo audits November 2026 and issues
// its record on 1 December 2026, whatever the machine's clock says, so every
// artifact is a function of the scenario alone.
var Clock = time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC)

// PlanCreated is when the scenario's plan was made: before the first
// audited month began.
var PlanCreated = time.Date(2026, 9, 28, 14, 0, 0, 0, time.UTC)

// Drawn is when the month's sample was drawn (the morning after the
// month's log closed) and Issued when its record was issued: for the
// latest month, once its labeling on the page — from Clock on, a label
// every few seconds, some seven thousand of them — is done, the same
// afternoon, before its signers sign (the next morning). The demo supplies these times to each command, so its
// artifacts do not depend on the machine's clock; they are recorded as
// supplied by the operator.
func (s Scenario) Drawn() time.Time { return s.monthEnd().Add(7 * time.Hour) }

// Issued: see Drawn.
func (s Scenario) Issued() time.Time {
	if t := s.monthEnd(); t.Equal(Clock.Truncate(24 * time.Hour)) {
		return Clock.Add(7 * time.Hour)
	}
	return s.monthEnd().AddDate(0, 0, 3).Add(16 * time.Hour)
}

// monthEnd is 00:00 UTC on the first day after the month.
func (s Scenario) monthEnd() time.Time {
	t, err := time.Parse("2006-01", s.Month)
	if err != nil {
		return Clock
	}
	return t.AddDate(0, 1, 0)
}

// PlanSeed is the selection seed the demo's plan is made with.
const PlanSeed = "5ca1ab1e0ddba11c0ffee0fdecade042"

// WriteLogGzip writes the log gzip-compressed with a fixed header (no
// name, no modification time), so the compressed bytes are reproducible.
func (s Scenario) WriteLogGzip(w io.Writer) error {
	zw, err := gzip.NewWriterLevel(w, gzip.BestSpeed)
	if err != nil {
		return err
	}
	zw.ModTime = time.Time{}
	if err := s.WriteLog(zw); err != nil {
		zw.Close()
		return err
	}
	return zw.Close()
}

// ThrowAwayKeySource returns the byte stream the demo's signing key is made
// from: SHA-256 in counter mode over a fixed phrase. The key it yields is
// published with the source code and signs nothing but demo records; it
// makes the demo's record, signature included, reproducible byte for byte.
func ThrowAwayKeySource() io.Reader {
	return &counterStream{phrase: "probity demo throw-away key:"}
}

// SignerKeySource returns the byte stream the demo's signer of a sign-off
// role (prepared, reviewed, approved) makes their key from: SHA-256 in
// counter mode over "probity demo signer key:ROLE:". Like the demo's
// signing key, these keys are published with the source code: records
// signed with them are demonstrations and authenticate nothing.
func SignerKeySource(role string) io.Reader {
	return &counterStream{phrase: "probity demo signer key:" + role + ":"}
}

type counterStream struct {
	phrase string
	block  [32]byte
	used   int
	n      uint64
}

func (c *counterStream) Read(p []byte) (int, error) {
	for i := range p {
		if c.used == 0 || c.used == len(c.block) {
			var ctr [8]byte
			binary.BigEndian.PutUint64(ctr[:], c.n)
			c.n++
			c.block = sha256.Sum256(append([]byte(c.phrase), ctr[:]...))
			c.used = 0
		}
		p[i] = c.block[c.used]
		c.used++
	}
	return len(p), nil
}
