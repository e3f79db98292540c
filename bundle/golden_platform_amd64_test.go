//go:build amd64 && !amd64.v3

package bundle

// goldenPlatform: this build computes the golden bundles' numbers to the bit.
const goldenPlatform = true
