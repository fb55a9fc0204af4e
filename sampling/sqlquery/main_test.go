package sqlquery

import (
	"testing"

	"probity/plan/testkit/pgtest"
)

// TestMain stops the throw-away PostgreSQL cluster the tests may have
// started.
func TestMain(m *testing.M) { pgtest.Main(m) }
