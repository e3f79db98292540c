package bundle

import (
	"bytes"
	"compress/gzip"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestDamagedArchiveMessages: a damaged or foreign archive is refused with
// the reason in words, never with the Go package's message
// ("archive/tar: invalid tar header", "gzip: invalid header", "unexpected
// EOF"), whether it is read from memory or from a file (which is
// decompressed in pieces first).
func TestDamagedArchiveMessages(t *testing.T) {
	good := testArchive(t)
	// The last gzip member's CRC-32 (the 4 bytes before the length) flipped.
	badCRC := bytes.Clone(good)
	badCRC[len(badCRC)-8] ^= 0xff
	// A tar cut 100 bytes into its one file's body, compressed whole.
	zr, err := gzip.NewReader(bytes.NewReader(rawArchive(t, dirE("b/"), fileE("b/data.csv", strings.Repeat("1.5\n", 100)))))
	if err != nil {
		t.Fatal(err)
	}
	tarBytes, err := io.ReadAll(zr)
	if err != nil {
		t.Fatal(err)
	}
	cut := gzipOf(tarBytes[:2*512+100])
	tests := []struct {
		name string
		data []byte
		want string
	}{
		{"not gzip at all", []byte("well,nitrate\nmw-1,1.5\nmw-2,2.5\n"),
			"bundle: not a gzip-compressed file: it does not begin with the gzip signature"},
		{"shorter than a gzip header", []byte("x"),
			"bundle: not a gzip-compressed file: it ends early"},
		{"gzip of text, not of a tar", gzipOf(bytes.Repeat([]byte("x"), 2048)),
			"bundle: not a readable tar archive: a block where a tar header belongs is not one"},
		{"gzip of a few bytes", gzipOf([]byte("a few bytes")),
			"bundle: not a readable tar archive: it ends early"},
		{"cut short inside a member", cut,
			`bundle: member "b/data.csv": truncated: the archive ends inside it`},
		{"checksum wrong", badCRC,
			"bundle: damaged compressed stream after the tar end: the decompressed bytes do not match the checksum stored with them"},
	}
	dir := t.TempDir()
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			path := filepath.Join(dir, strings.ReplaceAll(tt.name, " ", "-")+".tar.gz")
			if err := os.WriteFile(path, tt.data, 0o644); err != nil {
				t.Fatal(err)
			}
			f, err := os.Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			for _, got := range []struct {
				from string
				err  error
			}{
				{"memory", readErr(ReadArchive(bytes.NewReader(tt.data), DefaultLimits))},
				{"file", readErr(ReadArchive(f, DefaultLimits))},
			} {
				if got.err == nil {
					t.Fatalf("%s: read without error", got.from)
				}
				msg := got.err.Error()
				if !strings.HasPrefix(msg, tt.want) {
					t.Errorf("%s: %q, want %q", got.from, msg, tt.want)
				}
				for _, internal := range []string{"archive/tar", "gzip:", "flate:", "EOF"} {
					if strings.Contains(msg, internal) {
						t.Errorf("%s: %q shows %q", got.from, msg, internal)
					}
				}
			}
		})
	}
}

func readErr(_ *Bag, err error) error { return err }

// TestFileErrorsNameNoSystemCall: errors about a file or folder that
// cannot be read or written name it and the reason, not the system call
// or a temporary file's name ("open d/.key.tmp-123: …").
func TestFileErrorsNameNoSystemCall(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "afile")
	if err := os.WriteFile(file, []byte("x\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		do   func() error
		want string
	}{
		{"key pair under a file", func() error { _, err := WriteKeyPair(filepath.Join(file, "key"), "t"); return err },
			"writing " + filepath.Join(file, "key") + ": not a directory"},
		{"key pair in a missing folder", func() error { _, err := WriteKeyPair(filepath.Join(dir, "no", "key"), "t"); return err },
			"writing " + filepath.Join(dir, "no", "key") + ": no such file or directory"},
		{"signing key is a folder", func() error { _, err := LoadSigner(dir); return err },
			"signing key " + dir + ": is a directory"},
		{"signing key is not a key", func() error { _, err := LoadSigner(file); return err },
			"signing key " + file + ": not an OpenSSH private key (no key found); give the file that 'fitseal keygen' or 'ssh-keygen -t ed25519' wrote"},
		{"public key missing", func() error { _, err := ReadPublicKey(filepath.Join(dir, "no.pub")); return err },
			"public key " + filepath.Join(dir, "no.pub") + ": no such file or directory"},
		{"extract into a file", func() error {
			_, err := (&Bag{Name: "b", Files: map[string][]byte{"bagit.txt": nil}}).WriteTo(file)
			return err
		},
			file + ": not a directory"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.do()
			if err == nil || err.Error() != tt.want {
				t.Errorf("error %v, want %q", err, tt.want)
			}
		})
	}
}
