package sampling

import "testing"

func TestKeyAndPeriodSeed(t *testing.T) {
	// Reference values computed with coreutils sha256sum, independently of
	// Go's crypto/sha256, e.g. printf '%s' 'abc:r1' | sha256sum.
	cases := []struct{ got, want, src string }{
		{Key("abc", "r1"), "0cf2304e13e42c03790b29fa74d560ab7f24d150ca894797822c310f68f33c3a", "printf 'abc:r1' | sha256sum"},
		{PeriodSeed("abc", "2026-11"), "d371b66b4fe30ffaec674331ffc55a9178d2f19cdd73cf9ee95c307d79bfa568", "printf 'abc:period:2026-11' | sha256sum"},
		{Key("", ""), "e7ac0786668e0ff0f02b62bd04f45ff636fd82db63b1104601c975dc005f3a67", "printf ':' | sha256sum"},
		{Key("séed", "ü-1"), "e67b2b2778a89defc5c6a0d5fd5881eb1181e15328ea598aad42868c42008187", "printf 'séed:ü-1' | sha256sum (UTF-8)"},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: got %s, want %s", c.src, c.got, c.want)
		}
	}
}
