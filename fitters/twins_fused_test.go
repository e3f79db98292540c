//go:build !amd64 || amd64.v3

package fitters

// twinsExact: this build may fuse a multiply and an add into one rounding.
const twinsExact = false
