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
	"slices"
	"strconv"
	"strings"
	"time"

	"probity/plan/inputerr"
	"probity/plan/personname"
	"probity/plan/record"
)

// SignaturesFile is the name, in a record folder, of the file that holds
// the electronic signatures of people (`probity sign`).
const SignaturesFile = "signatures.txt"

// SignaturesHeader is the first line of the signatures file;
// ManifestationHeader the first line of every signed message in it.
const (
	SignaturesHeader    = "probity-signatures-v1"
	ManifestationHeader = "probity-signature-manifestation-v1"
)

// TimeLayout is how a signature's time is written: UTC, to the second.
const TimeLayout = "2006-01-02T15:04:05Z"

// ErrSignaturesFile is wrapped by every error about the content of the
// signatures file.
var ErrSignaturesFile = errors.New("invalid signatures file")

// Manifestation is one person's electronic signature of a record: the
// manifestation that 21 CFR 11.50 asks for (printed name, the date and
// time of signing, the meaning of the signature), with the sign-off role,
// bound to the record's content and to the signatures before it, and
// signed with the person's Ed25519 key.
//
// The signed message is exactly these lines, each ended by "\n", in this
// order (Message):
//
//	probity-signature-manifestation-v1
//	sequence: <1, 2, …: the place in the chain>
//	record-id: <record.json's record_id>
//	record-json-sha256: <hex SHA-256 of record.json's bytes>
//	seal-sha256: <hex SHA-256 of record.sig's bytes, or none>
//	previous-sha256: <hex SHA-256 of the previous signature's block, or none>
//	pdf-sha256: <hex SHA-256 of record.pdf as rendered with this signature shown>
//	name: <printed name>
//	role: <prepared, reviewed or approved>
//	meaning: <what the signature means>
//	signed-at: <YYYY-MM-DDTHH:MM:SSZ>
//	public-key: <base64 of the 32 raw bytes of the Ed25519 public key>
//	key-fingerprint: sha256:<hex SHA-256 of those 32 bytes>
//
// and its block in the signatures file is the message followed by the
// line "signature: <base64 of the 64-byte Ed25519 signature>". The next
// signature's previous-sha256 is the SHA-256 of this whole block
// (Digest), so no signature can be removed, reordered or replaced without
// breaking every one after it; pdf-sha256 binds the human-readable form
// the signer saw.
type Manifestation struct {
	Sequence       int
	RecordID       string
	RecordSHA256   string
	SealSHA256     string // "" when the record has no seal
	PreviousSHA256 string // "" for the first signature
	PDFSHA256      string
	Name           string
	Role           string
	Meaning        string
	SignedAt       time.Time
	PublicKey      ed25519.PublicKey
	Signature      []byte
}

// orNone writes an empty digest as "none".
func orNone(s string) string {
	if s == "" {
		return "none"
	}
	return s
}

// Message is the byte string the signer signs (see Manifestation).
func (m *Manifestation) Message() []byte {
	var b bytes.Buffer
	fmt.Fprintln(&b, ManifestationHeader)
	fmt.Fprintf(&b, "sequence: %d\n", m.Sequence)
	fmt.Fprintf(&b, "record-id: %s\n", m.RecordID)
	fmt.Fprintf(&b, "record-json-sha256: %s\n", m.RecordSHA256)
	fmt.Fprintf(&b, "seal-sha256: %s\n", orNone(m.SealSHA256))
	fmt.Fprintf(&b, "previous-sha256: %s\n", orNone(m.PreviousSHA256))
	fmt.Fprintf(&b, "pdf-sha256: %s\n", m.PDFSHA256)
	fmt.Fprintf(&b, "name: %s\n", m.Name)
	fmt.Fprintf(&b, "role: %s\n", m.Role)
	fmt.Fprintf(&b, "meaning: %s\n", m.Meaning)
	fmt.Fprintf(&b, "signed-at: %s\n", m.SignedAt.UTC().Format(TimeLayout))
	fmt.Fprintf(&b, "public-key: %s\n", base64.StdEncoding.EncodeToString(m.PublicKey))
	fmt.Fprintf(&b, "key-fingerprint: %s\n", Fingerprint(m.PublicKey))
	return b.Bytes()
}

// block is the message and the signature line.
func (m *Manifestation) block() []byte {
	return append(m.Message(), "signature: "+base64.StdEncoding.EncodeToString(m.Signature)+"\n"...)
}

// Digest is the hex SHA-256 of the signature's block, which the next
// signature names as previous-sha256.
func (m *Manifestation) Digest() string {
	sum := sha256.Sum256(m.block())
	return hex.EncodeToString(sum[:])
}

// KeyFingerprint is the fingerprint of the signer's public key.
func (m *Manifestation) KeyFingerprint() string { return Fingerprint(m.PublicKey) }

// Sign sets the public key from priv and signs the message.
func (m *Manifestation) Sign(priv ed25519.PrivateKey) {
	m.PublicKey = priv.Public().(ed25519.PublicKey)
	m.Signature = ed25519.Sign(priv, m.Message())
}

// Verify checks the signature over the message with the public key the
// manifestation carries. It says nothing about whose key that is (see
// Signers).
func (m *Manifestation) Verify() error {
	if len(m.PublicKey) != ed25519.PublicKeySize || !ed25519.Verify(m.PublicKey, m.Message(), m.Signature) {
		return mismatchf("signature %d (%s, %s) is not valid for its key %s: the signed text was changed", m.Sequence, m.Name, m.Role, Fingerprint(m.PublicKey))
	}
	return nil
}

// Shown is the signature as the PDF shows it.
func (m *Manifestation) Shown() record.ElectronicSignature {
	return record.ElectronicSignature{Sequence: m.Sequence, Name: m.Name, Role: m.Role, Meaning: m.Meaning,
		SignedAt: m.SignedAt.UTC(), KeyFingerprint: m.KeyFingerprint()}
}

// Shown lists the signatures as the PDF shows them.
func Shown(ms []Manifestation) []record.ElectronicSignature {
	out := make([]record.ElectronicSignature, len(ms))
	for i := range ms {
		out[i] = ms[i].Shown()
	}
	return out
}

// Binding is what every signature of a record is bound to.
type Binding struct {
	// RecordJSON is record.json's bytes and RecordID its record_id.
	RecordJSON []byte
	RecordID   string
	// Seal is record.sig's bytes (nil when the record has no seal).
	Seal []byte
}

// Next returns the next signature of the chain ms, bound to b, with
// sequence, record id and digests filled in; the caller sets the name,
// role, meaning, time and PDF digest, then signs it.
func Next(ms []Manifestation, b Binding) Manifestation {
	m := Manifestation{Sequence: len(ms) + 1, RecordID: b.RecordID, RecordSHA256: sha256Hex(b.RecordJSON)}
	if b.Seal != nil {
		m.SealSHA256 = sha256Hex(b.Seal)
	}
	if len(ms) > 0 {
		m.PreviousSHA256 = ms[len(ms)-1].Digest()
	}
	return m
}

func sha256Hex(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}

// CheckChain checks the signatures ms against b and each other, and
// returns every problem found (nil when none), each matching ErrMismatch:
// a signature that is not valid for its key, one bound to another
// record.json, record id or seal, a broken chain (previous-sha256), a
// time earlier than the signature before it, or a role signed twice. It
// does not say whose keys they are (see Signers.Check).
func CheckChain(ms []Manifestation, b Binding) []error {
	var out []error
	bad := func(format string, args ...any) { out = append(out, mismatchf(format, args...)) }
	want := Next(nil, b)
	roles := map[string]int{}
	for i := range ms {
		m := &ms[i]
		who := fmt.Sprintf("signature %d (%s, %s)", m.Sequence, m.Name, m.Role)
		if err := m.Verify(); err != nil {
			out = append(out, err)
		}
		if m.Sequence != i+1 {
			bad("%s is number %d in the file", who, i+1)
		}
		if m.RecordSHA256 != want.RecordSHA256 {
			bad("%s was made for another record.json (SHA-256 %s…; this one is %s…): the record was changed after it was signed", who, short(m.RecordSHA256), short(want.RecordSHA256))
		}
		if m.RecordID != want.RecordID {
			bad("%s names record %s, not %s", who, m.RecordID, want.RecordID)
		}
		if m.SealSHA256 != want.SealSHA256 {
			switch {
			case want.SealSHA256 == "":
				bad("%s was made over a seal (%s SHA-256 %s…), but the record has no %s", who, FileName, short(m.SealSHA256), FileName)
			case m.SealSHA256 == "":
				bad("%s was made before the record was sealed, but the record now has a %s: it was sealed again afterwards", who, FileName)
			default:
				bad("%s was made over another seal (%s SHA-256 %s…; this one is %s…): the record was sealed again after it was signed", who, FileName, short(m.SealSHA256), short(want.SealSHA256))
			}
		}
		prev := ""
		if i > 0 {
			prev = ms[i-1].Digest()
			if m.SignedAt.Before(ms[i-1].SignedAt) {
				bad("%s is dated %s, before signature %d (%s)", who, m.SignedAt.UTC().Format(TimeLayout), i, ms[i-1].SignedAt.UTC().Format(TimeLayout))
			}
		}
		if m.PreviousSHA256 != prev {
			bad("%s does not follow the signature before it in %s (previous-sha256 %s): a signature was removed, replaced or reordered", who, SignaturesFile, orNone(short(m.PreviousSHA256)))
		}
		if j, dup := roles[m.Role]; dup {
			bad("%s signs the role %s, which signature %d already signed", who, m.Role, j)
		}
		roles[m.Role] = m.Sequence
	}
	return out
}

// short is the first 12 digits of a digest, for messages.
func short(h string) string {
	if len(h) > 12 {
		return h[:12]
	}
	return h
}

// MarshalSignatures writes the signatures file: the line
// SignaturesHeader, then for each signature a blank line and its block
// (see Manifestation). It is the one spelling ParseSignatures accepts.
func MarshalSignatures(ms []Manifestation) []byte {
	var b bytes.Buffer
	fmt.Fprintln(&b, SignaturesHeader)
	for i := range ms {
		b.WriteByte('\n')
		b.Write(ms[i].block())
	}
	return b.Bytes()
}

// manifestationKeys are the keys of a block's lines after its header, in
// order.
var manifestationKeys = []string{"sequence", "record-id", "record-json-sha256", "seal-sha256", "previous-sha256", "pdf-sha256",
	"name", "role", "meaning", "signed-at", "public-key", "key-fingerprint", "signature"}

// ParseSignatures reads a signatures file written by MarshalSignatures.
// Anything else — another spelling of a value, a missing or extra line, a
// name with a character a name must not hold, a role that is not one of
// the sign-off roles — is refused with the line. It checks the form only;
// CheckChain checks the signatures.
func ParseSignatures(data []byte, name string) ([]Manifestation, error) {
	bad := func(line int, format string, args ...any) error {
		return inputerr.At(name, line, "", "%w: %s", ErrSignaturesFile, fmt.Sprintf(format, args...))
	}
	if len(data) == 0 || data[len(data)-1] != '\n' || bytes.ContainsRune(data, '\r') {
		return nil, bad(0, "the file must be text with \"\\n\" line ends, ending with one")
	}
	var lines []string
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	if err := sc.Err(); err != nil {
		return nil, bad(0, "%v", err)
	}
	if lines[0] != SignaturesHeader {
		return nil, bad(1, "the first line must be %q", SignaturesHeader)
	}
	blockLen := 2 + len(manifestationKeys) // blank, header, keys
	if len(lines) == 1 || (len(lines)-1)%blockLen != 0 {
		return nil, bad(len(lines), "the file holds %d lines; each signature is a blank line and %d lines", len(lines), blockLen-1)
	}
	var out []Manifestation
	for start := 1; start < len(lines); start += blockLen {
		if lines[start] != "" {
			return nil, bad(start+1, "a blank line must come before each signature")
		}
		if lines[start+1] != ManifestationHeader {
			return nil, bad(start+2, "a signature must begin with %q", ManifestationHeader)
		}
		vals := map[string]string{}
		lineOf := map[string]int{}
		for k, key := range manifestationKeys {
			n := start + 2 + k
			v, ok := strings.CutPrefix(lines[n], key+": ")
			if !ok || v == "" || strings.TrimSpace(v) != v {
				return nil, bad(n+1, "expected %q, found %q", key+": …", lines[n])
			}
			vals[key], lineOf[key] = v, n+1
		}
		m, err := parseManifestation(vals, len(out)+1)
		if err != nil {
			var fe *fieldError
			if errors.As(err, &fe) {
				return nil, bad(lineOf[fe.key], "%s: %s", fe.key, fe.msg)
			}
			return nil, err
		}
		out = append(out, m)
	}
	return out, nil
}

// fieldError is a bad value in a signature block.
type fieldError struct{ key, msg string }

func (e *fieldError) Error() string { return e.key + ": " + e.msg }

func parseManifestation(v map[string]string, want int) (Manifestation, error) {
	bad := func(key, format string, args ...any) error { return &fieldError{key, fmt.Sprintf(format, args...)} }
	var m Manifestation
	if v["sequence"] != strconv.Itoa(want) {
		return m, bad("sequence", "%q is not %d, this signature's place in the file", v["sequence"], want)
	}
	m.Sequence = want
	if !isHex(v["record-id"], record.IDLength) {
		return m, bad("record-id", "%q is not a record id (%d lowercase hex digits)", v["record-id"], record.IDLength)
	}
	m.RecordID = v["record-id"]
	digests := []struct {
		key  string
		dst  *string
		none bool
	}{{"record-json-sha256", &m.RecordSHA256, false}, {"seal-sha256", &m.SealSHA256, true}, {"previous-sha256", &m.PreviousSHA256, true}, {"pdf-sha256", &m.PDFSHA256, false}}
	for _, d := range digests {
		s := v[d.key]
		if d.none && s == "none" {
			continue
		}
		if !isHex(s, 64) {
			return m, bad(d.key, "%q is not a lowercase hex SHA-256", s)
		}
		*d.dst = s
	}
	if want == 1 && m.PreviousSHA256 != "" {
		return m, bad("previous-sha256", "the first signature follows none")
	}
	if want > 1 && m.PreviousSHA256 == "" {
		return m, bad("previous-sha256", "signature %d must name the one before it", want)
	}
	for _, key := range []string{"name", "meaning"} {
		c, err := personname.Clean(v[key])
		if err != nil {
			return m, bad(key, "%v", err)
		}
		if c != v[key] {
			return m, bad(key, "%q is not in normal form (NFC, trimmed)", v[key])
		}
	}
	m.Name, m.Meaning = v["name"], v["meaning"]
	if !slices.Contains(record.SignoffRoles, v["role"]) {
		return m, bad("role", "%q is not one of %s", v["role"], strings.Join(record.SignoffRoles, ", "))
	}
	m.Role = v["role"]
	t, err := time.Parse(TimeLayout, v["signed-at"])
	if err != nil || t.Format(TimeLayout) != v["signed-at"] {
		return m, bad("signed-at", "%q is not a UTC time in the form YYYY-MM-DDTHH:MM:SSZ", v["signed-at"])
	}
	m.SignedAt = t
	raw, err := base64.StdEncoding.DecodeString(v["public-key"])
	if err != nil || len(raw) != ed25519.PublicKeySize || base64.StdEncoding.EncodeToString(raw) != v["public-key"] {
		return m, bad("public-key", "is not the base64 of %d bytes", ed25519.PublicKeySize)
	}
	m.PublicKey = ed25519.PublicKey(raw)
	if fp := Fingerprint(m.PublicKey); v["key-fingerprint"] != fp {
		return m, bad("key-fingerprint", "%s does not match public-key (%s)", v["key-fingerprint"], fp)
	}
	sig, err := base64.StdEncoding.DecodeString(v["signature"])
	if err != nil || len(sig) != ed25519.SignatureSize || base64.StdEncoding.EncodeToString(sig) != v["signature"] {
		return m, bad("signature", "is not the base64 of %d bytes", ed25519.SignatureSize)
	}
	m.Signature = sig
	return m, nil
}

// isHex reports whether s is n lowercase hex digits.
func isHex(s string, n int) bool {
	if len(s) != n {
		return false
	}
	for _, c := range s {
		if !(c >= '0' && c <= '9' || c >= 'a' && c <= 'f') {
			return false
		}
	}
	return true
}
