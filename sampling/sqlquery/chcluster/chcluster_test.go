package chcluster

import (
	"strings"
	"testing"
)

// TestStart starts a cluster and reads a Distributed table over both
// shards.
func TestStart(t *testing.T) {
	c := Start(t)
	c.CreateDistributed(t, "default.d", "default.l", "default", "l", "x UInt64")
	c.MustQuery(t, "INSERT INTO default.d FORMAT TSV", strings.NewReader("1\n2\n3\n4\n5\n6\n7\n8\n"), "--insert_distributed_sync=1")
	if out := strings.TrimSpace(string(c.MustQuery(t, "SELECT sum(x) FROM default.d", nil))); out != "36" {
		t.Errorf("sum over the shards = %q, want 36", out)
	}
	var local []string
	for _, s := range c.Shards {
		out, err := s.Query("SELECT count() FROM default.l", nil)
		if err != nil {
			t.Fatal(err)
		}
		local = append(local, strings.TrimSpace(string(out)))
	}
	if local[0] == "0" || local[1] == "0" {
		t.Logf("rows per shard %v (rand() put them all on one)", local)
	}
	if err := c.Shards[1].Kill(); err != nil {
		t.Fatal(err)
	}
	if _, err := c.Query("SELECT sum(x) FROM default.d", nil); err == nil {
		t.Error("a query over a stopped shard succeeded")
	}
}
