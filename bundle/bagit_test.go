package bundle

import (
	"strconv"
	"strings"
	"testing"
)

func TestBuildBagTagFiles(t *testing.T) {
	c := testContents()
	files, err := Members(c, testSigner(t))
	if err != nil {
		t.Fatal(err)
	}
	// RFC 8493, section 2.1.1: exactly these two lines.
	if got := string(files[BagItFile]); got != "BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n" {
		t.Errorf("bagit.txt = %q", got)
	}
	var octets, count int
	for _, b := range c.Payload {
		octets += len(b)
		count++
	}
	wantInfo := "Bag-Software-Agent: fitseal test\n" +
		"Bagging-Date: 2026-12-02\n" +
		"External-Description: Demo bag for the bundle tests\n  second line\n" +
		"Payload-Oxum: " + itoa(octets) + "." + itoa(count) + "\n"
	if got := string(files[BagInfoFile]); got != wantInfo {
		t.Errorf("bag-info.txt =\n%s\nwant\n%s", got, wantInfo)
	}
	// Manifest: one line per payload file, sorted, "%" encoded as "%25".
	lines := strings.Split(strings.TrimSuffix(string(files[ManifestFile]), "\n"), "\n")
	if len(lines) != count {
		t.Fatalf("manifest has %d lines, want %d", len(lines), count)
	}
	var prev string
	for _, l := range lines {
		hash, p, _ := strings.Cut(l, "  ")
		if p <= prev {
			t.Errorf("manifest not sorted at %q", p)
		}
		prev = p
		if decoded := decodeManifestPath(p); sha256Hex(files[decoded]) != hash {
			t.Errorf("%s: manifest hash %s, file hash %s", p, hash, sha256Hex(files[decoded]))
		}
	}
	if !strings.Contains(string(files[ManifestFile]), "  data/inputs/data/100%25 pure.csv\n") {
		t.Error("manifest does not percent-encode %")
	}
	// The SHA-256 of the empty file, a well-known value (FIPS 180-4 test of
	// the empty message; recalled from memory, and the same as sha256sum of
	// /dev/null).
	if !strings.Contains(string(files[ManifestFile]), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  data/results/empty-but-kept.csv\n") {
		t.Error("empty file's hash is not SHA-256 of the empty message")
	}
	tm := string(files[TagManifestFile])
	for i, p := range []string{"bag-info.txt", "bagit.txt", "manifest-sha256.txt", "run.json"} {
		want := sha256Hex(files[p]) + "  " + p
		if got := strings.Split(tm, "\n")[i]; got != want {
			t.Errorf("tag manifest line %d = %q, want %q", i+1, got, want)
		}
	}
}

func itoa(n int) string { return strconv.Itoa(n) }

func TestParseManifest(t *testing.T) {
	good := "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  data/a%0Ab%25.csv\r\n" +
		"E3B0C44298FC1C149AFBF4C8996FB92427AE41E4649B934CA495991B7852B855\tdata/b.csv\n"
	es, err := parseManifest("m", []byte(good))
	if err == nil {
		t.Errorf("accepted a path with a line feed: %v", es)
	}
	es, err = parseManifest("m", []byte(strings.Replace(good, "%0A", "", 1)))
	if err != nil {
		t.Fatal(err)
	}
	if es[0].Path != "data/ab%.csv" || es[1].Path != "data/b.csv" || es[1].Hash != strings.ToLower(es[1].Hash) {
		t.Errorf("parsed %+v", es)
	}
	for _, bad := range []string{
		"nothex  data/a\n",
		"e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855\n",
		"e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  ../x\n",
		"e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  /etc/x\n",
		"e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  a\ne3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855  a\n",
	} {
		if _, err := parseManifest("m", []byte(bad)); err == nil {
			t.Errorf("accepted %q", bad)
		}
	}
}

func TestParseTagFile(t *testing.T) {
	tags, err := parseTagFile("bag-info.txt", []byte("Bagging-Date: 2026-12-02\nExternal-Description: one\n  two\nPayload-Oxum: 3.1\n"))
	if err != nil {
		t.Fatal(err)
	}
	if v, _ := tagValue(tags, "external-description"); v != "one\ntwo" {
		t.Errorf("continued value = %q", v)
	}
	if v, _ := tagValue(tags, "PAYLOAD-OXUM"); v != "3.1" {
		t.Errorf("Payload-Oxum = %q", v)
	}
	if _, err := parseTagFile("x", []byte("no colon here\n")); err == nil {
		t.Error("accepted a line without a label")
	}
}
