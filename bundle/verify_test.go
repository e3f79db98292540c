package bundle

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"
)

func openArchiveBytes(t *testing.T, b []byte) *Bag {
	t.Helper()
	bag, err := ReadArchive(bytes.NewReader(b), DefaultLimits)
	if err != nil {
		t.Fatal(err)
	}
	return bag
}

func TestRoundTripVerifies(t *testing.T) {
	s := testSigner(t)
	bag := openArchiveBytes(t, testArchive(t))
	if bag.Name != "harbor-demo" {
		t.Errorf("bag name %q", bag.Name)
	}
	c := testContents()
	if !reflect.DeepEqual(normalise(bag.Payload()), normalise(c.Payload)) {
		t.Error("payload did not round-trip")
	}
	if !bytes.Equal(bag.RunJSON(), c.RunJSON) {
		t.Error("run.json did not round-trip")
	}
	opts := VerifyOptions{ExpectedSigner: s.Fingerprint(), Pinned: s.PublicKey()}
	if fs := bag.Verify(opts); len(fs) != 0 {
		t.Errorf("intact bag has findings: %v", fs)
	}
	// The signer may also be given as the public key line.
	if fs := bag.Verify(VerifyOptions{ExpectedSigner: s.AuthorizedKey()}); len(fs) != 0 {
		t.Errorf("signer as key line: %v", fs)
	}
	if k, err := bag.SignatureKey(); err != nil || Fingerprint(k) != s.Fingerprint() {
		t.Errorf("SignatureKey = %v, %v", k, err)
	}
}

// normalise maps nil to empty so that an empty file compares equal.
func normalise(m map[string][]byte) map[string]string {
	out := map[string]string{}
	for k, v := range m {
		out[k] = string(v)
	}
	return out
}

func TestArchiveByteIdentical(t *testing.T) {
	a, b := testArchive(t), testArchive(t)
	if !bytes.Equal(a, b) {
		t.Fatal("two writes of the same contents differ")
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "b.tar.gz")
	c := testContents()
	if err := Write(out, false, c.Name, c.Created, c.Payload, c.RunJSON, testSigner(t), c.Description); err == nil {
		// Write leaves ToolVersion to the build; compare with WriteBundle below.
	} else {
		t.Fatal(err)
	}
	out2 := filepath.Join(dir, "c.tar.gz")
	if err := WriteBundle(out2, false, c, testSigner(t)); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(out2)
	if !bytes.Equal(got, a) {
		t.Error("WriteBundle's file differs from WriteArchive's bytes")
	}
	if err := WriteBundle(out2, false, c, testSigner(t)); !errors.Is(err, ErrExists) {
		t.Errorf("overwrite without force: %v", err)
	}
	if err := WriteBundle(out2, true, c, testSigner(t)); err != nil {
		t.Errorf("overwrite with force: %v", err)
	}
}

func TestFolderBundleVerifies(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "bag-as-folder")
	if err := WriteBundle(out, false, testContents(), testSigner(t)); err != nil {
		t.Fatal(err)
	}
	bag, err := Open(out)
	if err != nil {
		t.Fatal(err)
	}
	if bag.Name != "bag-as-folder" {
		t.Errorf("folder bag name %q", bag.Name)
	}
	if fs := bag.Verify(VerifyOptions{ExpectedSigner: testSigner(t).Fingerprint()}); len(fs) != 0 {
		t.Errorf("folder bag has findings: %v", fs)
	}
	// The same bag, extracted from the archive, has the same files.
	arch := filepath.Join(dir, "b.tar.gz")
	os.WriteFile(arch, testArchive(t), 0o644)
	where, err := Extract(arch, filepath.Join(dir, "x"))
	if err != nil {
		t.Fatal(err)
	}
	if where != filepath.Join(dir, "x", "harbor-demo") {
		t.Errorf("extracted to %s", where)
	}
	ext, err := Open(where)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(normalise(ext.Files), normalise(bag.Files)) {
		t.Error("extracted bag differs from the folder bag")
	}
	if _, err := Extract(arch, filepath.Join(dir, "x")); !errors.Is(err, ErrExists) {
		t.Errorf("second extract into the same folder: %v, want ErrExists", err)
	}
}

// TestTamperEachMember flips one byte in every member of a good bag, and
// expects a finding that names that member (or, for the tag manifest and the
// signature, the signature).
func TestTamperEachMember(t *testing.T) {
	good := openArchiveBytes(t, testArchive(t))
	opts := VerifyOptions{ExpectedSigner: testSigner(t).Fingerprint()}
	for _, p := range good.Paths() {
		if len(good.Files[p]) == 0 {
			continue // the empty file has no byte to flip; see the added/deleted cases
		}
		t.Run(p, func(t *testing.T) {
			bag := cloneBag(good)
			d := bytes.Clone(bag.Files[p])
			d[len(d)/2] ^= 0x01
			bag.Files[p] = d
			fs := bag.Verify(opts)
			want := p
			if p == TagManifestFile {
				want = SignatureFile
			}
			if !hasFinding(fs, want, "") {
				t.Errorf("flipped byte in %s not named; findings: %v", p, fs)
			}
		})
	}
}

func TestTamperMembersAddedDeletedAndKeys(t *testing.T) {
	good := openArchiveBytes(t, testArchive(t))
	opts := VerifyOptions{ExpectedSigner: testSigner(t).Fingerprint()}
	for _, tc := range []struct {
		name       string
		edit       func(b *Bag)
		opts       VerifyOptions
		member     string
		kind       string
		wantExpect string
	}{
		{"deleted payload file", func(b *Bag) { delete(b.Files, "data/results/fits.csv") }, opts,
			"data/results/fits.csv", KindMissing, ""},
		{"deleted empty file", func(b *Bag) { delete(b.Files, "data/results/empty-but-kept.csv") }, opts,
			"data/results/empty-but-kept.csv", KindMissing, ""},
		{"added payload file", func(b *Bag) { b.Files["data/results/extra.csv"] = []byte("x") }, opts,
			"data/results/extra.csv", KindExtra, ""},
		{"added tag file", func(b *Bag) { b.Files["notes.txt"] = []byte("x") }, opts,
			"notes.txt", KindExtra, ""},
		{"deleted run.json", func(b *Bag) { delete(b.Files, RunFile) }, opts, RunFile, KindMissing, ""},
		{"deleted signature", func(b *Bag) { delete(b.Files, SignatureFile) }, opts, SignatureFile, KindMissing, ""},
		{"deleted tag manifest", func(b *Bag) { delete(b.Files, TagManifestFile) }, opts, TagManifestFile, KindMissing, ""},
		{"signature from another key", func(b *Bag) {
			sig, _ := signTagManifest(otherSigner(t), b.Files[TagManifestFile])
			b.Files[SignatureFile] = sig
		}, opts, SignatureFile, KindSigner, testSigner(t).Fingerprint()},
		{"pinned to another key", func(b *Bag) {}, VerifyOptions{Pinned: otherSigner(t).PublicKey()},
			SignatureFile, KindPin, otherSigner(t).Fingerprint()},
		{"signature not armored", func(b *Bag) { b.Files[SignatureFile] = []byte("hello") }, opts,
			SignatureFile, KindSignature, ""},
		{"bagit.txt version changed", func(b *Bag) {
			b.Files[BagItFile] = []byte("BagIt-Version: 0.97\nTag-File-Character-Encoding: UTF-8\n")
		}, opts, BagItFile, KindFormat, "1.0"},
		{"bagit.txt garbage", func(b *Bag) { b.Files[BagItFile] = []byte("garbage") }, opts, BagItFile, KindFormat, ""},
		{"deleted bagit.txt", func(b *Bag) { delete(b.Files, BagItFile) }, opts, BagItFile, KindMissing, ""},
		{"manifest lists a tag file", func(b *Bag) {
			b.Files[ManifestFile] = append(b.Files[ManifestFile], []byte(sha256Hex(b.Files[RunFile])+"  run.json\n")...)
		}, opts, ManifestFile, KindFormat, ""},
		{"manifest malformed", func(b *Bag) { b.Files[ManifestFile] = []byte("zz  data/x\n") }, opts, ManifestFile, KindFormat, ""},
		{"tag manifest lists a payload file", func(b *Bag) {
			b.Files[TagManifestFile] = append(b.Files[TagManifestFile], []byte(sha256Hex(b.Files["data/results/fits.csv"])+"  data/results/fits.csv\n")...)
		}, opts, TagManifestFile, KindFormat, ""},
		{"tag manifest drops run.json", func(b *Bag) {
			b.Files[TagManifestFile] = manifest(b.Files, []string{BagInfoFile, BagItFile, ManifestFile})
			sig, _ := signTagManifest(testSigner(t), b.Files[TagManifestFile])
			b.Files[SignatureFile] = sig
		}, opts, RunFile, KindExtra, ""},
		{"deleted bag-info.txt", func(b *Bag) { delete(b.Files, BagInfoFile) }, opts, BagInfoFile, KindMissing, ""},
		{"oxum edited and re-listed", func(b *Bag) {
			b.Files[BagInfoFile] = bytes.Replace(b.Files[BagInfoFile], []byte("Payload-Oxum: "), []byte("Payload-Oxum: 9"), 1)
			b.Files[TagManifestFile] = manifest(b.Files, tagManifestCovers)
			sig, _ := signTagManifest(testSigner(t), b.Files[TagManifestFile])
			b.Files[SignatureFile] = sig
		}, opts, BagInfoFile, KindOxum, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			bag := cloneBag(good)
			tc.edit(bag)
			fs := bag.Verify(tc.opts)
			if !hasFinding(fs, tc.member, tc.kind) {
				t.Fatalf("no %s finding for %s; findings: %v", tc.kind, tc.member, fs)
			}
			if tc.wantExpect != "" {
				for _, f := range fs {
					if f.Kind == tc.kind && f.Expected != tc.wantExpect {
						t.Errorf("finding expects %s, want %s", f.Expected, tc.wantExpect)
					}
				}
			}
		})
	}
}

// TestHashFindingNamesHashes: a changed payload file's finding carries the
// manifest's hash and the file's actual hash.
func TestHashFindingNamesHashes(t *testing.T) {
	bag := openArchiveBytes(t, testArchive(t))
	orig := bag.Files["data/results/fits.csv"]
	changed := bytes.ToUpper(orig) // same length, so Payload-Oxum still holds
	bag.Files["data/results/fits.csv"] = changed
	fs := bag.Verify(VerifyOptions{})
	if len(fs) != 1 {
		t.Fatalf("findings %v, want exactly one", fs)
	}
	f := fs[0]
	if f.Member != "data/results/fits.csv" || f.Kind != KindHash || f.Expected != sha256Hex(orig) || f.Found != sha256Hex(changed) {
		t.Errorf("finding %+v", f)
	}
	if s := f.String(); !strings.Contains(s, f.Expected) || !strings.Contains(s, "data/results/fits.csv") {
		t.Errorf("String() = %q", s)
	}
}

func cloneBag(b *Bag) *Bag {
	c := &Bag{Name: b.Name, Files: map[string][]byte{}}
	for k, v := range b.Files {
		c.Files[k] = bytes.Clone(v)
	}
	return c
}

func hasFinding(fs []Finding, member, kind string) bool {
	for _, f := range fs {
		if f.Member == member && (kind == "" || f.Kind == kind) {
			return true
		}
	}
	return false
}

func TestDefaultOutput(t *testing.T) {
	got := DefaultOutput(filepath.Join("studies", "pumps", "fitseal.toml"), "harbor-pumps-2026",
		time.Date(2026, 12, 2, 4, 5, 6, 0, time.FixedZone("CET", 3600)))
	want := filepath.Join("studies", "pumps", "bundles", "harbor-pumps-2026-20261202T030506Z.tar.gz")
	if got != want || !IsArchivePath(got) || IsArchivePath("bundles/x") {
		t.Errorf("DefaultOutput = %s, want %s", got, want)
	}
}

func TestPrivateKeyNeverSealed(t *testing.T) {
	private, _, _, err := GenerateKey(nil, "")
	if err != nil {
		t.Fatal(err)
	}
	c := testContents()
	c.Payload["inputs/data/id_ed25519"] = private
	_, err = Members(c, testSigner(t))
	if err == nil || !strings.Contains(err.Error(), "data/inputs/data/id_ed25519 holds a private key") {
		t.Errorf("private key in the payload: %v", err)
	}
	c = testContents()
	c.RunJSON = append([]byte("{\"key\":\""), private...)
	if _, err := Members(c, testSigner(t)); err == nil || !strings.Contains(err.Error(), "run.json") {
		t.Errorf("private key in run.json: %v", err)
	}
	// Keys in several files, scanned on the workers: the first in path
	// order is named, whatever the number of workers.
	for _, workers := range []int{1, 2, 8} {
		c = testContents()
		c.Workers = workers
		c.Payload["inputs/z/key"] = private
		c.Payload["inputs/b/key"] = private
		c.Payload["results/key"] = private
		_, err = Members(c, testSigner(t))
		if err == nil || !strings.Contains(err.Error(), "data/inputs/b/key holds a private key") {
			t.Errorf("%d workers, keys in three files: %v, want data/inputs/b/key named", workers, err)
		}
	}
}
