package record

import "time"

// ElectronicSignature is one person's electronic signature of a record, as
// the PDF's sign-off block shows it (the signature manifestation of 21 CFR
// 11.50): who signed, in which sign-off role, what the signature means,
// when (UTC, from the signer's system clock) and with which key. The
// signatures themselves, chained and bound to record.json, are in the
// record folder's signatures file (package plan/record/signature).
type ElectronicSignature struct {
	// Sequence is the signature's place in the chain, from 1.
	Sequence int
	// Name is the signer's printed name; Role the sign-off role signed
	// (prepared, reviewed, approved); Meaning what the signature means.
	Name, Role, Meaning string
	// SignedAt is the time of signing, UTC, to the second.
	SignedAt time.Time
	// KeyFingerprint identifies the signer's public key ("sha256:…").
	KeyFingerprint string
}
