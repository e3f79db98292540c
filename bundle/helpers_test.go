package bundle

import (
	"bytes"
	"crypto/ed25519"
	"os"
	"os/exec"
	"testing"
)

// testSigner is a fixed Ed25519 key (seed bytes 1..32), for reproducible
// bundles in tests only.
func testSigner(t testing.TB) Signer {
	t.Helper()
	seed := make([]byte, ed25519.SeedSize)
	for i := range seed {
		seed[i] = byte(i + 1)
	}
	s, err := NewSigner(ed25519.NewKeyFromSeed(seed))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// otherSigner is a second fixed key (seed bytes 101..132).
func otherSigner(t testing.TB) Signer {
	t.Helper()
	seed := make([]byte, ed25519.SeedSize)
	for i := range seed {
		seed[i] = byte(i + 101)
	}
	s, err := NewSigner(ed25519.NewKeyFromSeed(seed))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// testContents is a small bag's contents (invented values).
func testContents() Contents {
	return Contents{
		Name:        "harbor-demo",
		Created:     testCreated,
		Description: "Demo bag for the bundle tests\nsecond line",
		ToolVersion: "test",
		Payload: map[string][]byte{
			"inputs/fitseal.toml":         []byte("name = \"harbor-demo\"\n"),
			"inputs/data/seal_life.csv":   []byte("hours,state\n812,\n1204,+\n933,\n"),
			"results/fits.csv":            []byte("analysis,dataset,family\nseal-life,seal-life,weibull\n"),
			"results/parameters.csv":      []byte("analysis,family,parameter\n"),
			"tables/ranking.md":           []byte("| family |\n|---|\n| weibull |\n"),
			"figures/seal-life-qq.svg":    []byte("<svg xmlns=\"http://www.w3.org/2000/svg\"/>\n"),
			"results/results.json":        []byte("{}\n"),
			"inputs/data/100% pure.csv":   []byte("x\n1\n"),
			"results/empty-but-kept.csv":  nil,
			"report.pdf":                  []byte("%PDF-1.4\n"),
			"results/derived.csv":         []byte("analysis,family,quantity\n"),
			"results/gof.csv":             []byte("analysis,family,statistic\n"),
			"inputs/data/sub/peaks.csv":   []byte("peak\n3.1\n"),
			"inputs/data/sub/peaks-2.csv": []byte("peak\n4.1\n"),
		},
		RunJSON: []byte("{\"tool\":\"fitseal\",\"seed\":1}\n"),
	}
}

// testArchive is testContents signed with testSigner, as a tar.gz.
func testArchive(t testing.TB) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteArchive(&buf, testContents(), testSigner(t)); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// needSSHKeygen skips the test when ssh-keygen is missing, except under CI,
// which installs openssh-client and must run the interop tests.
func needSSHKeygen(t *testing.T) string {
	t.Helper()
	p, err := exec.LookPath("ssh-keygen")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("ssh-keygen not found; CI must install openssh-client")
		}
		t.Skip("ssh-keygen not found (install openssh-client)")
	}
	return p
}
