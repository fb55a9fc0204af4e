package record

import (
	"crypto/sha256"
	"encoding/hex"
)

// IDLength is the number of hex digits of a record id: 128 bits, so that
// no two records share an id by chance, and none can be made to share
// another's by search.
const IDLength = 32

// idDomain begins the bytes a record id is the digest of.
const idDomain = "probity-record-id-v2\n"

// ID returns the record id of r: the first IDLength hex digits of
//
//	SHA-256("probity-record-id-v2\n" + Encode(r with record_id ""))
//
// that is, of the canonical record.json with an empty record_id. It covers
// everything the record says: the fingerprints of every input, the
// judgement, the declared use, the bound, the dates, the sealing key, the
// wording digest, the revision and what it supersedes. Records that differ
// in any field have different ids; the same record always has the same.
func ID(r *Record) (string, error) {
	c := *r
	c.RecordID = ""
	data, err := Encode(&c)
	if err != nil {
		return "", err
	}
	sum := sha256.Sum256(append([]byte(idDomain), data...))
	return hex.EncodeToString(sum[:])[:IDLength], nil
}

// IsID reports whether s has the form of a record id: IDLength lowercase
// hex digits.
func IsID(s string) bool {
	if len(s) != IDLength {
		return false
	}
	for _, c := range s {
		if !(c >= '0' && c <= '9' || c >= 'a' && c <= 'f') {
			return false
		}
	}
	return true
}

// SHA256 is the lowercase hex SHA-256 of data, the form of every
// fingerprint in a record.
func SHA256(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}
