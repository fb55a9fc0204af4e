package delimscan

import (
	"os"
	"runtime"
	"testing"
)

// TestRequiredAssemblyInUse fails when PROBITY_REQUIRE_ASM=1 is set and
// the masks are not built by the AVX2 assembly, so that a CI run on
// x86-64 proves the assembly the tool ships is the code that ran there
// (and agreed with the portable code in its start-up check). Without the
// variable it only records which path is in use.
func TestRequiredAssemblyInUse(t *testing.T) {
	t.Logf("AVX2 masks in use: %v (GOARCH %s)", Accelerated(), runtime.GOARCH)
	if os.Getenv("PROBITY_REQUIRE_ASM") == "1" && !Accelerated() {
		t.Fatalf("PROBITY_REQUIRE_ASM=1, but the AVX2 masks are not in use on %s: the build has -tags purego or is not for amd64, the processor lacks AVX2, or the assembly disagreed with the portable code at start-up", runtime.GOARCH)
	}
}
