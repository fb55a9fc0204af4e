package record

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"strings"
)

// IDLength is the number of hex digits of a record id.
const IDLength = 12

// ID returns the record id: the first IDLength hex digits of
//
//	SHA-256("probity-record-id-v1\n" +
//	        "plan:<hex>\nlog:<hex>\nmanifest:<hex>\nledger:<hex>\n" +
//	        "worksheet:<hex>\nlabels:<hex>\n")
//
// over the fingerprints of the judged inputs, in that fixed order. The same
// inputs always give the same id; a change to any of them changes it.
func ID(f Fingerprints) string {
	var b strings.Builder
	b.WriteString("probity-record-id-v1\n")
	fmt.Fprintf(&b, "plan:%s\nlog:%s\nmanifest:%s\nledger:%s\nworksheet:%s\nlabels:%s\n",
		f.Plan, f.Log, f.Manifest, f.Ledger, f.Worksheet, f.Labels)
	sum := sha256.Sum256([]byte(b.String()))
	return hex.EncodeToString(sum[:])[:IDLength]
}

// SHA256 is the lowercase hex SHA-256 of data, the form of every
// fingerprint in a record.
func SHA256(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}
