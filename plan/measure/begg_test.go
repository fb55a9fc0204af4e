package measure

import (
	"encoding/json"
	"math"
	"os/exec"
	"testing"

	"probity/plan/testkit/needs"
)

// The verification-bias example: hepatic scintigraphy for liver cancer in
// 650 patients (Drum & Christacopoulos, J. Nucl. Med. 13, 1972), of whom
// only those the scan sent on were verified by pathology — verification
// depends on the test result. The counts, as tabulated in Zhou, Obuchowski
// & McClish, "Statistical Methods in Diagnostic Medicine" (Wiley), in the
// chapter on verification bias (from memory; we could not consult the
// table):
//
//	scan        verified diseased   verified healthy   unverified   total
//	positive          231                  32                89        352
//	negative           27                  54               217        298
//
// Read as an audit: the scan is the model, its two results are the
// strata (sizes known for every patient), the verified patients are the
// labeled sample of each stratum, and pathology is the label.
var hepatic = struct {
	N            [2]int64 // scan positive, scan negative
	diseased, ok [2]int   // verified diseased / healthy per stratum
}{N: [2]int64{352, 298}, diseased: [2]int{231, 27}, ok: [2]int{32, 54}}

func hepaticSample() (Population, Sample) {
	p := binary(hepatic.N[0], hepatic.N[1])
	s := make(Sample, 2)
	for h := 0; h < 2; h++ {
		for i := 0; i < hepatic.diseased[h]; i++ {
			s[h] = append(s[h], Label{Positive: true})
		}
		for i := 0; i < hepatic.ok[h]; i++ {
			s[h] = append(s[h], Label{})
		}
	}
	return p, s
}

// beggGreenes is the published estimator (Begg & Greenes, "Assessment of
// diagnostic tests when disease verification is subject to selection
// bias", Biometrics 39, 1983): with P̂(T = t) from all n patients and
// P̂(D | T) from the verified ones,
//
//	Se = P̂(T+)P̂(D+|T+) / (P̂(T+)P̂(D+|T+) + P̂(T−)P̂(D+|T−))
//	Sp = P̂(T−)P̂(D−|T−) / (P̂(T−)P̂(D−|T−) + P̂(T+)P̂(D−|T+))
//
// and the variance of its logit by the delta method (the formula as in Zhou,
// Stat. Med. 13, 1994; derived again here: the log-odds of T± are
// multinomial, the verified rates binomial):
//
//	Var(Se) = (Se(1−Se))²·(n/(n₀n₁) + r₁/(s₁(s₁+r₁)) + r₀/(s₀(s₀+r₀)))
//
// s, r the verified diseased and healthy, subscripts the scan result.
func beggGreenes() (se, sp, varSe, varSp float64) {
	n1, n0 := float64(hepatic.N[0]), float64(hepatic.N[1])
	s1, r1 := float64(hepatic.diseased[0]), float64(hepatic.ok[0])
	s0, r0 := float64(hepatic.diseased[1]), float64(hepatic.ok[1])
	n := n0 + n1
	a, b := n1/n*s1/(s1+r1), n0/n*s0/(s0+r0)
	se = a / (a + b)
	c, d := n0/n*r0/(s0+r0), n1/n*r1/(s1+r1)
	sp = c / (c + d)
	varSe = math.Pow(se*(1-se), 2) * (n/(n0*n1) + r1/(s1*(s1+r1)) + r0/(s0*(s0+r0)))
	varSp = math.Pow(sp*(1-sp), 2) * (n/(n0*n1) + s1/(r1*(s1+r1)) + s0/(r0*(s0+r0)))
	return se, sp, varSe, varSp
}

// TestBeggGreenesIsTheStratifiedMissRate: the weighted estimate of the
// miss rate (fnr) and the false-alarm rate (fpr) from a sample stratified
// by the model's prediction is Begg & Greenes' corrected 1 − sensitivity
// and 1 − specificity, to rounding (1e-12); and it is the design-based
// ratio estimator of a stratified sample (R's survey package, svyratio
// with strata = scan result and fpc = stratum size; tolerance 1e-9). The
// published delta-method interval is recomputed beside probity's exact
// one-sided bound (a finite-population bound valid at any size; the Wald
// interval is neither), and both are logged.
func TestBeggGreenesIsTheStratifiedMissRate(t *testing.T) {
	p, s := hepaticSample()
	se, sp, varSe, varSp := beggGreenes()
	counted := []int{len(s[0]), len(s[1])}
	fnr, err := (ClaimDesign{Claim: Claim{0, FNR, 0.5}, Counted: counted, Floor: 250, BAccept: 60}).Judge(p, s, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	fpr, err := (ClaimDesign{Claim: Claim{0, FPR, 0.5}, Counted: counted, Floor: 180, BAccept: 40}).Judge(p, s, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	// reference values: the published estimator on the table's counts
	// (Begg & Greenes 1983), tolerance 1e-12
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"1 − sensitivity (fnr)", fnr.Estimate, 1 - se},
		{"1 − specificity (fpr)", fpr.Estimate, 1 - sp},
	} {
		if math.Abs(c.got-c.want) > 1e-12 {
			t.Errorf("%s: probity %.15g, Begg & Greenes %.15g", c.name, c.got, c.want)
		}
	}
	conf, err := Estimate(p, s)
	if err != nil {
		t.Fatal(err)
	}
	if got := conf[0].TP / (conf[0].TP + conf[0].FN); math.Abs(got-se) > 1e-12 {
		t.Errorf("sensitivity from the weighted confusion matrix %.15g, Begg & Greenes %.15g", got, se)
	}
	var ref struct{ FNR, FPR float64 }
	rscript(t, `suppressMessages(library(survey))
d <- data.frame(T = c(rep(1, 263), rep(0, 81)), D = c(rep(1, 231), rep(0, 32), rep(1, 27), rep(0, 54)))
d$N <- ifelse(d$T == 1, 352, 298)
d$fn <- as.numeric(d$D == 1 & d$T == 0); d$fp <- as.numeric(d$D == 0 & d$T == 1)
d$pos <- d$D; d$neg <- 1 - d$D
des <- svydesign(ids = ~1, strata = ~T, fpc = ~N, data = d)
a <- coef(svyratio(~fn, ~pos, des)); b <- coef(svyratio(~fp, ~neg, des))
cat(sprintf('{"FNR": %.17g, "FPR": %.17g}', a, b))`, &ref)
	if math.Abs(fnr.Estimate-ref.FNR) > 1e-9 || math.Abs(fpr.Estimate-ref.FPR) > 1e-9 {
		t.Errorf("survey::svyratio gives fnr %.12g and fpr %.12g; probity %.12g and %.12g", ref.FNR, ref.FPR, fnr.Estimate, fpr.Estimate)
	}
	z := 1.6448536269514722 // one-sided 95 % normal quantile
	t.Logf("hepatic scintigraphy (counts from memory): corrected Se %.4f (SE %.4f), Sp %.4f (SE %.4f)", se, math.Sqrt(varSe), sp, math.Sqrt(varSp))
	t.Logf("fnr %.4f: Wald 95 %% upper limit %.4f (published delta-method variance); probity's exact bound %.4f (floor %d true positives, c_B %d)",
		fnr.Estimate, 1-se+z*math.Sqrt(varSe), fnr.Upper, 250, 60)
	t.Logf("fpr %.4f: Wald 95 %% upper limit %.4f; probity's exact bound %.4f (floor %d true negatives, c_B %d)",
		fpr.Estimate, 1-sp+z*math.Sqrt(varSp), fpr.Upper, 180, 40)
	if !(fnr.Upper >= fnr.Estimate && fpr.Upper >= fpr.Estimate) {
		t.Errorf("an upper bound below its estimate: fnr %v < %v or fpr %v < %v", fnr.Upper, fnr.Estimate, fpr.Upper, fpr.Estimate)
	}
}

// rscript runs an R script and decodes the JSON it prints. Without Rscript
// or the survey package the test fails in CI and skips elsewhere
// (needs.RPackages).
func rscript(t *testing.T, script string, out any) {
	t.Helper()
	data, err := exec.Command(needs.RPackages(t, "survey"), "-e", script).Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		t.Fatalf("Rscript failed: %v\n%s", err, msg)
	}
	if err := json.Unmarshal(data, out); err != nil {
		t.Fatalf("decoding Rscript output: %v\n%s", err, data)
	}
}
