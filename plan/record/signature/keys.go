package signature

import (
	"crypto/ed25519"
	"crypto/sha256"
	"crypto/x509"
	"encoding/hex"
	"encoding/pem"
	"errors"
	"fmt"
	"io"
	"probity/plan/inputerr"
)

// ErrKey is wrapped by every error about the content of a key file.
var ErrKey = errors.New("invalid key file")

// PEM block types of the key files.
const (
	privateBlock = "PRIVATE KEY"
	publicBlock  = "PUBLIC KEY"
)

// GenerateKey makes an Ed25519 key pair from random (crypto/rand.Reader in
// production; a fixed stream in tests).
func GenerateKey(random io.Reader) (ed25519.PublicKey, ed25519.PrivateKey, error) {
	pub, priv, err := ed25519.GenerateKey(random)
	if err != nil {
		return nil, nil, fmt.Errorf("generating key: %w", err)
	}
	return pub, priv, nil
}

// MarshalPrivate encodes a private key as a PEM "PRIVATE KEY" block
// (PKCS #8), the form openssl reads.
func MarshalPrivate(priv ed25519.PrivateKey) ([]byte, error) {
	der, err := x509.MarshalPKCS8PrivateKey(priv)
	if err != nil {
		return nil, fmt.Errorf("encoding private key: %w", err)
	}
	return pem.EncodeToMemory(&pem.Block{Type: privateBlock, Bytes: der}), nil
}

// MarshalPublic encodes a public key as a PEM "PUBLIC KEY" block (PKIX).
func MarshalPublic(pub ed25519.PublicKey) ([]byte, error) {
	der, err := x509.MarshalPKIXPublicKey(pub)
	if err != nil {
		return nil, fmt.Errorf("encoding public key: %w", err)
	}
	return pem.EncodeToMemory(&pem.Block{Type: publicBlock, Bytes: der}), nil
}

// ParsePrivate decodes a key written by MarshalPrivate. name is used in
// error messages.
func ParsePrivate(data []byte, name string) (ed25519.PrivateKey, error) {
	der, err := pemBlock(data, name, privateBlock)
	if err != nil {
		return nil, err
	}
	k, err := x509.ParsePKCS8PrivateKey(der)
	if err != nil {
		return nil, inputerr.At(name, 0, "", "%w: %v", ErrKey, err)
	}
	priv, ok := k.(ed25519.PrivateKey)
	if !ok {
		return nil, inputerr.At(name, 0, "", "%w: the private key is not an Ed25519 key", ErrKey)
	}
	return priv, nil
}

// ParsePublic decodes a key written by MarshalPublic.
func ParsePublic(data []byte, name string) (ed25519.PublicKey, error) {
	der, err := pemBlock(data, name, publicBlock)
	if err != nil {
		return nil, err
	}
	k, err := x509.ParsePKIXPublicKey(der)
	if err != nil {
		return nil, inputerr.At(name, 0, "", "%w: %v", ErrKey, err)
	}
	pub, ok := k.(ed25519.PublicKey)
	if !ok {
		return nil, inputerr.At(name, 0, "", "%w: the public key is not an Ed25519 key", ErrKey)
	}
	return pub, nil
}

func pemBlock(data []byte, name, want string) ([]byte, error) {
	b, rest := pem.Decode(data)
	if b == nil {
		return nil, inputerr.At(name, 0, "", "%w: no PEM %q block found", ErrKey, want)
	}
	if b.Type != want {
		return nil, inputerr.At(name, 0, "", "%w: found a PEM %q block where a %q block was expected", ErrKey, b.Type, want)
	}
	if len(pemTrim(rest)) != 0 {
		return nil, inputerr.At(name, 0, "", "%w: unexpected data after the %q block", ErrKey, want)
	}
	return b.Bytes, nil
}

func pemTrim(b []byte) []byte {
	for len(b) > 0 && (b[0] == '\n' || b[0] == '\r' || b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	return b
}

// Fingerprint identifies a public key: "sha256:" followed by the lowercase
// hex SHA-256 of its 32 raw bytes. It is what record.json's signing_key,
// the PDF and record.sig show.
func Fingerprint(pub ed25519.PublicKey) string {
	sum := sha256.Sum256(pub)
	return "sha256:" + hex.EncodeToString(sum[:])
}
