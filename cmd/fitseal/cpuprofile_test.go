package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestStartCPUProfile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "cpu.out")
	tests := []struct {
		name     string
		env      string
		wantFile bool
		wantWarn string
	}{
		{"unset: no profile", "", false, ""},
		{"writable path: a profile", path, true, ""},
		{"missing folder: a warning, no profile", filepath.Join(dir, "no", "such", "cpu.out"), false, "not profiling"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var stderr bytes.Buffer
			stop := startCPUProfile(func(k string) string {
				if k == "FITSEAL_CPUPROFILE" {
					return tc.env
				}
				return ""
			}, &stderr)
			stop()
			if tc.wantWarn != "" && !strings.Contains(stderr.String(), tc.wantWarn) {
				t.Errorf("stderr = %q, want it to contain %q", stderr.String(), tc.wantWarn)
			}
			if !tc.wantFile {
				return
			}
			b, err := os.ReadFile(tc.env)
			if err != nil {
				t.Fatal(err)
			}
			// A pprof profile is gzip-compressed protobuf: it starts with gzip's magic bytes.
			if len(b) < 2 || b[0] != 0x1f || b[1] != 0x8b {
				t.Errorf("profile is not a gzip'd pprof file (%d bytes)", len(b))
			}
		})
	}
}

func TestStartTrace(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "trace.out")
	for _, tc := range []struct {
		name     string
		env      string
		wantFile bool
		wantWarn string
	}{
		{"unset: no trace", "", false, ""},
		{"writable path: a trace", path, true, ""},
		{"missing folder: a warning, no trace", filepath.Join(dir, "no", "such", "trace.out"), false, "not tracing"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var stderr bytes.Buffer
			stop := startTrace(func(k string) string {
				if k == "FITSEAL_TRACE" {
					return tc.env
				}
				return ""
			}, &stderr)
			stop()
			if tc.wantWarn != "" && !strings.Contains(stderr.String(), tc.wantWarn) {
				t.Errorf("stderr = %q, want it to contain %q", stderr.String(), tc.wantWarn)
			}
			if !tc.wantFile {
				return
			}
			b, err := os.ReadFile(tc.env)
			if err != nil {
				t.Fatal(err)
			}
			// An execution trace starts with its header, "go 1.NN trace".
			if !bytes.HasPrefix(b, []byte("go 1.")) || !bytes.Contains(b[:min(len(b), 16)], []byte("trace")) {
				t.Errorf("not an execution trace: starts %q", b[:min(len(b), 16)])
			}
		})
	}
}
