package signature

import (
	"bufio"
	"bytes"
	"crypto/ed25519"
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"errors"
	"fmt"
	"probity/plan/inputerr"
	"sort"
	"strings"
)

// FileName is the name of the signature file in a record folder.
const FileName = "record.sig"

// Header is the first line of a record.sig of this format version.
const Header = "probity-signature-v1"

// ErrSigFile is wrapped by every error about the content of record.sig.
var ErrSigFile = errors.New("invalid signature file")

// ErrMismatch is wrapped by every failed verification.
var ErrMismatch = errors.New("signature check failed")

// Sig is record.sig. On disk, in this order, one field per line, "\n" line
// ends:
//
//	probity-signature-v1
//	algorithm: ed25519
//	public-key: <base64 of the 32 raw public-key bytes>
//	key-fingerprint: sha256:<hex SHA-256 of those 32 bytes>
//	file: <name> <hex SHA-256 of the file> <base64 Ed25519 signature>
//	...
//
// with one "file:" line per signed file, sorted by name. Each signature is
// over the message
//
//	"probity-signature-v1\n" + name + "\n" + <hex SHA-256 of the file> + "\n"
//
// (see Message), so a signature cannot be moved to another file name.
type Sig struct {
	PublicKey ed25519.PublicKey
	Files     []SignedFile
}

// SignedFile is one "file:" line.
type SignedFile struct {
	Name      string
	SHA256    string
	Signature []byte
}

// Message is the byte string signed for a file called name with contents
// data.
func Message(name string, data []byte) []byte {
	sum := sha256.Sum256(data)
	return []byte(Header + "\n" + name + "\n" + hex.EncodeToString(sum[:]) + "\n")
}

// Sign signs each named file (name → contents) with priv.
func Sign(priv ed25519.PrivateKey, files map[string][]byte) *Sig {
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	sort.Strings(names)
	s := &Sig{PublicKey: priv.Public().(ed25519.PublicKey)}
	for _, n := range names {
		sum := sha256.Sum256(files[n])
		s.Files = append(s.Files, SignedFile{
			Name:      n,
			SHA256:    hex.EncodeToString(sum[:]),
			Signature: ed25519.Sign(priv, Message(n, files[n])),
		})
	}
	return s
}

// Marshal writes the file format described on Sig.
func (s *Sig) Marshal() []byte {
	var b bytes.Buffer
	fmt.Fprintln(&b, Header)
	fmt.Fprintln(&b, "algorithm: ed25519")
	fmt.Fprintf(&b, "public-key: %s\n", base64.StdEncoding.EncodeToString(s.PublicKey))
	fmt.Fprintf(&b, "key-fingerprint: %s\n", Fingerprint(s.PublicKey))
	for _, f := range s.Files {
		fmt.Fprintf(&b, "file: %s %s %s\n", f.Name, f.SHA256, base64.StdEncoding.EncodeToString(f.Signature))
	}
	return b.Bytes()
}

// Parse reads record.sig. name is used in error messages, which give the
// line.
func Parse(data []byte, name string) (*Sig, error) {
	bad := func(line int, format string, args ...any) error {
		return inputerr.At(name, line, "", "%w: %s", ErrSigFile, fmt.Sprintf(format, args...))
	}
	sc := bufio.NewScanner(bytes.NewReader(data))
	var lines []string
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	if err := sc.Err(); err != nil {
		return nil, inputerr.At(name, 0, "", "%w: %v", ErrSigFile, err)
	}
	if len(lines) == 0 || lines[0] != Header {
		return nil, bad(1, "the first line must be %q", Header)
	}
	field := func(i int, key string) (string, error) {
		if i >= len(lines) {
			return "", bad(i+1, "missing %q line", key)
		}
		v, ok := strings.CutPrefix(lines[i], key+": ")
		if !ok {
			return "", bad(i+1, "expected %q, found %q", key+": …", lines[i])
		}
		return v, nil
	}
	alg, err := field(1, "algorithm")
	if err != nil {
		return nil, err
	}
	if alg != "ed25519" {
		return nil, bad(2, "algorithm %q is not supported (only ed25519)", alg)
	}
	pk, err := field(2, "public-key")
	if err != nil {
		return nil, err
	}
	raw, err := base64.StdEncoding.DecodeString(pk)
	if err != nil || len(raw) != ed25519.PublicKeySize {
		return nil, bad(3, "public-key is not the base64 of %d bytes", ed25519.PublicKeySize)
	}
	s := &Sig{PublicKey: ed25519.PublicKey(raw)}
	fp, err := field(3, "key-fingerprint")
	if err != nil {
		return nil, err
	}
	if fp != Fingerprint(s.PublicKey) {
		return nil, bad(4, "key-fingerprint %s does not match public-key (%s)", fp, Fingerprint(s.PublicKey))
	}
	seen := map[string]bool{}
	for i := 4; i < len(lines); i++ {
		v, err := field(i, "file")
		if err != nil {
			return nil, err
		}
		parts := strings.Split(v, " ")
		if len(parts) != 3 {
			return nil, bad(i+1, "a file line holds a name, a SHA-256 and a signature")
		}
		sum, err := hex.DecodeString(parts[1])
		if err != nil || len(sum) != sha256.Size || parts[1] != strings.ToLower(parts[1]) {
			return nil, bad(i+1, "%q is not a lowercase hex SHA-256", parts[1])
		}
		sig, err := base64.StdEncoding.DecodeString(parts[2])
		if err != nil || len(sig) != ed25519.SignatureSize {
			return nil, bad(i+1, "the signature of %s is not the base64 of %d bytes", parts[0], ed25519.SignatureSize)
		}
		if seen[parts[0]] {
			return nil, bad(i+1, "%s is listed twice", parts[0])
		}
		seen[parts[0]] = true
		s.Files = append(s.Files, SignedFile{Name: parts[0], SHA256: parts[1], Signature: sig})
	}
	if len(s.Files) == 0 {
		return nil, bad(len(lines)+1, "no file is signed")
	}
	return s, nil
}

// Names lists the signed file names in file order.
func (s *Sig) Names() []string {
	out := make([]string, len(s.Files))
	for i, f := range s.Files {
		out[i] = f.Name
	}
	return out
}

// Verify checks the signature of one signed file against its contents. It
// returns an error matching ErrMismatch that says what differs: the file is
// not signed, its SHA-256 differs from the one signed, or the signature is
// not valid for the key.
func (s *Sig) Verify(name string, data []byte) error {
	for _, f := range s.Files {
		if f.Name != name {
			continue
		}
		sum := sha256.Sum256(data)
		if got := hex.EncodeToString(sum[:]); got != f.SHA256 {
			return mismatchf("%s has SHA-256 %s, but %s signed %s: the file was changed after signing", name, got[:16]+"…", FileName, f.SHA256[:16]+"…")
		}
		if !ed25519.Verify(s.PublicKey, Message(name, data), f.Signature) {
			return mismatchf("the signature of %s in %s is not valid for key %s", name, FileName, Fingerprint(s.PublicKey))
		}
		return nil
	}
	return mismatchf("%s is not signed in %s", name, FileName)
}

// VerifySigned checks the signature of a signed file against the SHA-256
// record.sig states for it, without the file itself, and returns that
// SHA-256: it proves that the key signed a file with that digest (a
// record.pdf since replaced, for instance), not that a file at hand is it.
func (s *Sig) VerifySigned(name string) (string, error) {
	for _, f := range s.Files {
		if f.Name != name {
			continue
		}
		msg := []byte(Header + "\n" + name + "\n" + f.SHA256 + "\n")
		if !ed25519.Verify(s.PublicKey, msg, f.Signature) {
			return "", mismatchf("the signature of %s in %s is not valid for key %s", name, FileName, Fingerprint(s.PublicKey))
		}
		return f.SHA256, nil
	}
	return "", mismatchf("%s is not signed in %s", name, FileName)
}

// mismatch is a failed signature check: errors.Is(err, ErrMismatch) holds,
// and the message says what differs without the sentinel's words, so a
// caller can print it as it is.
type mismatch struct{ msg string }

func (e *mismatch) Error() string        { return e.msg }
func (e *mismatch) Is(target error) bool { return target == ErrMismatch }

func mismatchf(format string, args ...any) error {
	return &mismatch{msg: fmt.Sprintf(format, args...)}
}
