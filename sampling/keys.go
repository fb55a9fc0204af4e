package sampling

import (
	"crypto/sha256"
	"encoding/hex"
)

// KeyDefinition states the selection key in words; it is written into
// every manifest for reviewers.
const KeyDefinition = `key = lowercase hex SHA-256 of the UTF-8 bytes "<selection_seed>:<record id>"; in each stratum the n_h rows with the smallest keys form the sample and the next ones, in key order, the spares`

// Key returns the selection key of a record: the lowercase hex SHA-256 of
// the UTF-8 bytes "<seed>:<id>". The seed is used exactly as written.
func Key(seed, id string) string {
	s := sha256.Sum256([]byte(seed + ":" + id))
	return hex.EncodeToString(s[:])
}

// PeriodSeed returns the selection seed of a periodic draw: the lowercase
// hex SHA-256 of "<plan seed>:period:<label>". Each period's sample is new
// but anyone holding the plan can recompute it.
func PeriodSeed(planSeed, label string) string {
	s := sha256.Sum256([]byte(planSeed + ":period:" + label))
	return hex.EncodeToString(s[:])
}
