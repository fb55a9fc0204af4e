// Package signature signs and verifies acceptance records with Ed25519.
//
// Two kinds of signature live in a record folder:
//
//   - record.sig (Sig) is the operator's seal: whoever runs `probity
//     record --sign-key` seals record.json and the record.pdf as issued.
//     It shows that the record was not changed after it was issued and by
//     whom it was issued; it is not the signature of a person who
//     prepared, reviewed or approved the record.
//   - signatures.txt (Manifestation) holds the electronic signatures of
//     people (`probity sign`): each names the signer, the sign-off role,
//     the meaning of the signature and the UTC time, and is bound to
//     record.json, to the seal, to the rendering of the PDF that shows it
//     and to the signature before it (a chain).
//
// A signers file (Signers) binds key fingerprints to people and roles; it
// is what the verification of people's signatures trusts. Keys are PEM
// files: the private key in the clear (PKCS #8) or protected by a
// passphrase (the OpenSSH private key format, golang.org/x/crypto/ssh),
// the public key as PKIX. A key's fingerprint is the SHA-256 of its 32 raw
// bytes. The keys `probity demo` signs with are published and recognised
// (IsDemoKey).
//
// The package computes and never prints; it reads no clock (times are
// passed in). Randomness for key generation is passed in as an io.Reader;
// only the salt of a passphrase-protected key comes from crypto/rand inside
// golang.org/x/crypto/ssh.
package signature
