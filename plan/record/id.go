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
// over the fingerprints of the judged inputs, in that fixed order. A record
// judged on double labels (lq not nil) also depends on the labeled second
// worksheet and the adjudication file, so their SHA-256 follow as
//
//	"second:<hex>\nadjudications:<hex>\n"
//
// (adjudications empty when there was no file). A record whose labels were
// derived from a label trail ends with the trail's SHA-256 as
//
//	"trail:<hex>\n"
//
// so the id also covers who labeled when. The same inputs always give
// the same id; a change to any of them changes it.
func ID(f Fingerprints, lq *LabelQuality) string {
	var b strings.Builder
	b.WriteString("probity-record-id-v1\n")
	fmt.Fprintf(&b, "plan:%s\nlog:%s\nmanifest:%s\nledger:%s\nworksheet:%s\nlabels:%s\n",
		f.Plan, f.Log, f.Manifest, f.Ledger, f.Worksheet, f.Labels)
	if lq != nil {
		fmt.Fprintf(&b, "second:%s\nadjudications:%s\n", lq.SecondWorksheet, lq.Adjudications)
	}
	if f.Trail != "" {
		fmt.Fprintf(&b, "trail:%s\n", f.Trail)
	}
	sum := sha256.Sum256([]byte(b.String()))
	return hex.EncodeToString(sum[:])[:IDLength]
}

// SHA256 is the lowercase hex SHA-256 of data, the form of every
// fingerprint in a record.
func SHA256(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
}
