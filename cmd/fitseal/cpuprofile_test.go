package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FITSEAL_CPUPROFILE and FITSEAL_TRACE: unset, nothing; a writable path, a
// file of the right kind; a missing folder, a warning and no file.
func TestStartRecordings(t *testing.T) {
	dir := t.TempDir()
	for _, tool := range []struct {
		env, doing string
		start      func(func(string) string, io.Writer) func()
		isKind     func([]byte) bool
	}{
		// A pprof profile is gzip-compressed protobuf: gzip's magic bytes.
		{"FITSEAL_CPUPROFILE", "profiling", startCPUProfile, func(b []byte) bool { return len(b) >= 2 && b[0] == 0x1f && b[1] == 0x8b }},
		// An execution trace starts with its header, "go 1.NN trace".
		{"FITSEAL_TRACE", "tracing", startTrace, func(b []byte) bool {
			return bytes.HasPrefix(b, []byte("go 1.")) && bytes.Contains(b[:min(len(b), 16)], []byte("trace"))
		}},
	} {
		path := filepath.Join(dir, tool.env+".out")
		for _, tc := range []struct {
			name     string
			env      string
			wantFile bool
			wantWarn string
		}{
			{"unset: nothing", "", false, ""},
			{"writable path: a file", path, true, ""},
			{"missing folder: a warning, no file", filepath.Join(dir, "no", "such", "x.out"), false, "not " + tool.doing},
		} {
			t.Run(tool.env+" "+tc.name, func(t *testing.T) {
				var stderr bytes.Buffer
				stop := tool.start(func(k string) string {
					if k == tool.env {
						return tc.env
					}
					return ""
				}, &stderr)
				stop()
				if tc.wantWarn != "" && !strings.Contains(stderr.String(), tc.wantWarn) {
					t.Errorf("stderr = %q, want it to contain %q", stderr.String(), tc.wantWarn)
				}
				if tc.wantWarn == "" && stderr.Len() > 0 {
					t.Errorf("stderr = %q, want nothing", stderr.String())
				}
				if !tc.wantFile {
					return
				}
				b, err := os.ReadFile(tc.env)
				if err != nil {
					t.Fatal(err)
				}
				if !tool.isKind(b) {
					t.Errorf("%s wrote no file of its kind: starts %q", tool.env, b[:min(len(b), 16)])
				}
			})
		}
	}
}
