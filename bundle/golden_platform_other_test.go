//go:build !amd64 || amd64.v3

package bundle

// goldenPlatform: this build's numbers may differ from the golden
// bundles' in their last bits.
const goldenPlatform = false
