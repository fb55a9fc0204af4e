package sequential

import (
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/testkit/golden"
	"probity/plan/testkit/needs"
)

// recomputePy recomputes P(accept) and the ASN of a rule given as the two
// boundary arrays, by a plain forward recursion over (t, e) written
// independently of this package (Python, no scipy needed).
const recomputePy = `import json, sys
rule = json.load(open(sys.argv[1]))
T = rule["max_sample_size"]
acc = rule["accept_if_errors_at_most"]
rej = rule["reject_if_errors_at_least"]
for p in map(float, sys.argv[2:]):
    run = {0: 1.0}
    pa = 0.0
    asn = 0.0
    for t in range(1, T + 1):
        asn += sum(run.values())
        nxt = {}
        for e, v in run.items():
            nxt[e] = nxt.get(e, 0.0) + v * (1 - p)
            nxt[e + 1] = nxt.get(e + 1, 0.0) + v * p
        a, r = acc[t - 1], rej[t - 1]
        run = {}
        for e, v in nxt.items():
            if e <= a:
                pa += v
            elif r is not None and e >= r:
                pass
            else:
                run[e] = v
    print(repr(pa), repr(asn))
`

// The example plan's boundaries are kept in testdata (a regression guard:
// a change to the search shows up as a diff there), and its exact risks
// and ASNs are recomputed from those arrays by an independent Python
// recursion: relative agreement within 1e-12.
func TestExampleRuleRecomputedIndependently(t *testing.T) {
	d, err := Search(Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join("..", "..", "testdata", "sequential", "example-rule.json")
	type ruleJSON struct {
		MaxSampleSize int    `json:"max_sample_size"`
		Accept        []int  `json:"accept_if_errors_at_most"`
		Reject        []*int `json:"reject_if_errors_at_least"`
	}
	got, err := json.Marshal(ruleJSON{d.Rule.MaxSampleSize, d.Rule.AcceptIfErrorsAtMost, d.Rule.RejectIfErrorsAtLeast})
	if err != nil {
		t.Fatal(err)
	}
	got = append(got, '\n')
	golden.Compare(t, path, got)
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	py := needs.PythonModules(t)
	out, err := exec.Command(py, "-c", recomputePy, path, "0.01", "0.02").Output()
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(out)), "\n")
	var rj ruleJSON
	if err := json.Unmarshal(want, &rj); err != nil {
		t.Fatal(err)
	}
	r := plan.SequentialRule{MaxSampleSize: rj.MaxSampleSize, AcceptIfErrorsAtMost: rj.Accept, RejectIfErrorsAtLeast: rj.Reject}
	for i, p := range []float64{0.01, 0.02} {
		f := strings.Fields(lines[i])
		pa, _ := strconv.ParseFloat(f[0], 64)
		asn, _ := strconv.ParseFloat(f[1], 64)
		perf, err := Evaluate(&r, Binomial{P: p})
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(pa-perf.Accept) > 1e-12*math.Max(pa, 1e-300) || math.Abs(asn-perf.ASN) > 1e-12*asn {
			t.Errorf("p %v: Python P(accept) %.17g ASN %.17g; DP %.17g %.17g", p, pa, asn, perf.Accept, perf.ASN)
		}
	}
}
