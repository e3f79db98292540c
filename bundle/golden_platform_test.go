package bundle

import "testing"

// skipOffGoldenPlatform skips a test that compares a freshly fitted bundle
// with a golden one byte for byte on a build that fuses multiply-adds
// (arm64, GOAMD64=v3): the golden bundles were made on amd64, and a
// bundle is byte-identical only on the same kind of processor (SPEC.md,
// "Determinism"); across processors the last bits of the numbers move,
// which verify allows for within stated tolerances and
// `FITSEAL_LONG=1 go test ./cmd/fitseal -run TestVerifyOnArm64` checks.
// Golden files are never regenerated there either.
func skipOffGoldenPlatform(t *testing.T) {
	t.Helper()
	if !goldenPlatform {
		t.Skip("golden bundles are byte-identical only on amd64 builds that do not fuse multiply-adds (SPEC.md, Determinism); verify compares numbers across processors")
	}
}
