package signature

// demoKeys are the fingerprints of the keys `probity demo` signs with: its
// operator's seal and its three signers (prepared, reviewed, approved).
// Their private keys are made from fixed byte streams published with the
// source (sampling/demolog), so anyone can sign with them; a test in
// cmd/probity checks that the demo's keys are these.
var demoKeys = map[string]string{
	"sha256:c1de7cd5817f589928f5ec1dd82bd21c57f961f3b9a52ae7732be7cdec415ad8": "the demo's operator seal",
	"sha256:54d3c0087de1a8e125a5c683f9c6309751aef11b637cd44cfd5d1ba8ad720072": "the demo's preparer",
	"sha256:a7c1c2fe1da8bbaeccb3274823192c15ebb3264e3b594f48fca002bdc4c11c16": "the demo's reviewer",
	"sha256:a3214c46ec0df5e753385dc92eb2e459c0c4073fa74e6c467507197e9e56091a": "the demo's approver",
}

// IsDemoKey reports whether a key fingerprint is one of the published
// demonstration keys of `probity demo`. A signature with such a key proves
// nothing about who made it: verification never trusts one.
func IsDemoKey(fingerprint string) bool {
	_, ok := demoKeys[fingerprint]
	return ok
}
