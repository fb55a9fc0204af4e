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

	"golang.org/x/crypto/ssh"
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

// Protection says how a private key file is stored.
type Protection int

const (
	// Clear: the key is stored unencrypted; whoever can read the file can
	// sign with it.
	Clear Protection = iota
	// Passphrase: the key is encrypted under a passphrase (the OpenSSH
	// private key format: bcrypt_pbkdf, AES-256-CTR).
	Passphrase
)

// ErrPassphrase is wrapped by the refusal of a wrong passphrase, and of a
// protected key when no passphrase can be had.
var ErrPassphrase = errors.New("the passphrase does not open the key")

// MinPassphrase is the fewest characters a new passphrase may have.
const MinPassphrase = 10

// opensshBlock is the PEM block type of an OpenSSH private key file.
const opensshBlock = "OPENSSH PRIVATE KEY"

// MarshalProtected encodes a private key encrypted under passphrase in the
// OpenSSH private key format (PEM "OPENSSH PRIVATE KEY": bcrypt_pbkdf with
// 16 rounds, AES-256-CTR), through golang.org/x/crypto/ssh. ssh-keygen
// reads it (`ssh-keygen -y -f KEY` prints its public key; `ssh-keygen -p
// -f KEY` changes the passphrase). The salt comes from crypto/rand inside
// that library. A passphrase shorter than MinPassphrase characters is
// refused.
func MarshalProtected(priv ed25519.PrivateKey, passphrase []byte) ([]byte, error) {
	if n := len([]rune(string(passphrase))); n < MinPassphrase {
		return nil, inputerr.Errorf("the passphrase has %d characters; use at least %d", n, MinPassphrase)
	}
	b, err := ssh.MarshalPrivateKeyWithPassphrase(priv, "probity signing key", passphrase)
	if err != nil {
		return nil, fmt.Errorf("encrypting private key: %w", err)
	}
	return pem.EncodeToMemory(b), nil
}

// ReadPrivate decodes a private key file: a clear key written by
// MarshalPrivate (PEM "PRIVATE KEY", PKCS #8), or an OpenSSH private key
// (PEM "OPENSSH PRIVATE KEY", as MarshalProtected or `ssh-keygen -t
// ed25519` writes it), protected by a passphrase or not. passphrase is
// called only for a protected key, to ask for it (nil: a protected key is
// refused). name is used in error messages.
func ReadPrivate(data []byte, name string, passphrase func() ([]byte, error)) (ed25519.PrivateKey, Protection, error) {
	b, _ := pem.Decode(data)
	if b == nil || b.Type != opensshBlock {
		k, err := ParsePrivate(data, name)
		return k, Clear, err
	}
	if _, err := pemBlock(data, name, opensshBlock); err != nil {
		return nil, Clear, err
	}
	raw, err := ssh.ParseRawPrivateKey(data)
	protection := Clear
	var missing *ssh.PassphraseMissingError
	if errors.As(err, &missing) {
		protection = Passphrase
		if passphrase == nil {
			return nil, protection, inputerr.At(name, 0, "", "%w: the key is protected by a passphrase and none was given", ErrPassphrase)
		}
		pass, perr := passphrase()
		if perr != nil {
			return nil, protection, perr
		}
		raw, err = ssh.ParseRawPrivateKeyWithPassphrase(data, pass)
		if errors.Is(err, x509.IncorrectPasswordError) {
			return nil, protection, inputerr.At(name, 0, "", "%w", ErrPassphrase)
		}
	}
	if err != nil {
		return nil, protection, inputerr.At(name, 0, "", "%w: %v", ErrKey, err)
	}
	var priv ed25519.PrivateKey
	switch k := raw.(type) {
	case *ed25519.PrivateKey:
		priv = *k
	case ed25519.PrivateKey:
		priv = k
	default:
		return nil, protection, inputerr.At(name, 0, "", "%w: the private key is not an Ed25519 key", ErrKey)
	}
	return priv, protection, nil
}

// ParsePrivate decodes a clear key written by MarshalPrivate. name is used
// in error messages.
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
