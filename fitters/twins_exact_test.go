//go:build amd64 && !amd64.v3

package fitters

// twinsExact: this build never fuses a multiply and an add.
const twinsExact = true
