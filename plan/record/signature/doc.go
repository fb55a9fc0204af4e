// Package signature signs and verifies acceptance records with Ed25519:
// key pairs in PEM files (PKCS #8 private key, PKIX public key), the public
// key's fingerprint, and record.sig, a small versioned text file with a
// detached signature over each signed file.
//
// The package computes and never prints; it reads no clock. Randomness for
// key generation is passed in as an io.Reader.
package signature
