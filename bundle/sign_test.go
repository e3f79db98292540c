package bundle

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestSSHKeygenVerifiesFitsealSignature: the reviewer's check from SPEC.md,
// 'ssh-keygen -Y verify -f allowed_signers -I SIGNER -n fitseal -s SIG <
// tagmanifest', accepts what fitseal writes, both with fitseal's own key and
// with a key made by ssh-keygen; and refuses a tampered tag manifest.
func TestSSHKeygenVerifiesFitsealSignature(t *testing.T) {
	keygen := needSSHKeygen(t)
	dir := t.TempDir()
	sshKey := filepath.Join(dir, "id_ed25519")
	if out, err := exec.Command(keygen, "-q", "-t", "ed25519", "-N", "", "-C", "ci", "-f", sshKey).CombinedOutput(); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	sshSigner, err := LoadSigner(sshKey)
	if err != nil {
		t.Fatal(err)
	}
	for name, s := range map[string]Signer{"fitseal key": testSigner(t), "ssh-keygen key": sshSigner} {
		t.Run(name, func(t *testing.T) {
			files, err := Members(testContents(), s)
			if err != nil {
				t.Fatal(err)
			}
			allowed := filepath.Join(dir, "allowed_signers")
			os.WriteFile(allowed, []byte("auditor@example.org "+s.AuthorizedKey()+"\n"), 0o644)
			sig := filepath.Join(dir, "sig")
			os.WriteFile(sig, files[SignatureFile], 0o644)
			verify := func(msg []byte) (string, error) {
				cmd := exec.Command(keygen, "-Y", "verify", "-f", allowed, "-I", "auditor@example.org", "-n", "fitseal", "-s", sig)
				cmd.Stdin = bytes.NewReader(msg)
				out, err := cmd.CombinedOutput()
				return string(out), err
			}
			out, err := verify(files[TagManifestFile])
			if err != nil || !strings.Contains(out, "Good \"fitseal\" signature") {
				t.Fatalf("ssh-keygen refused fitseal's signature: %v\n%s", err, out)
			}
			tampered := bytes.Clone(files[TagManifestFile])
			tampered[0] ^= 1
			if out, err := verify(tampered); err == nil {
				t.Errorf("ssh-keygen accepted a tampered tag manifest:\n%s", out)
			}
		})
	}
}

// TestFitsealVerifiesSSHKeygenSignature: a signature made by
// 'ssh-keygen -Y sign -n fitseal' passes fitseal's check; one made in
// another namespace does not.
func TestFitsealVerifiesSSHKeygenSignature(t *testing.T) {
	keygen := needSSHKeygen(t)
	dir := t.TempDir()
	key := filepath.Join(dir, "k")
	if out, err := exec.Command(keygen, "-q", "-t", "ed25519", "-N", "", "-f", key).CombinedOutput(); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	msg := filepath.Join(dir, "tagmanifest-sha256.txt")
	os.WriteFile(msg, []byte("0000  bagit.txt\n"), 0o644)
	s, _ := LoadSigner(key)
	for _, ns := range []string{"fitseal", "file"} {
		os.Remove(msg + ".sig")
		if out, err := exec.Command(keygen, "-Y", "sign", "-f", key, "-n", ns, msg).CombinedOutput(); err != nil {
			t.Fatalf("%v\n%s", err, out)
		}
		sig, _ := os.ReadFile(msg + ".sig")
		pub, err := checkSignature([]byte("0000  bagit.txt\n"), sig)
		if ns == "fitseal" && (err != nil || Fingerprint(pub) != s.Fingerprint()) {
			t.Errorf("ssh-keygen's signature refused: %v", err)
		}
		if ns != "fitseal" && (err == nil || !strings.Contains(err.Error(), "namespace")) {
			t.Errorf("namespace %q accepted: %v", ns, err)
		}
	}
}

func TestSignatureDeterministic(t *testing.T) {
	a, _ := signTagManifest(testSigner(t), []byte("x\n"))
	b, _ := signTagManifest(testSigner(t), []byte("x\n"))
	if !bytes.Equal(a, b) {
		t.Error("Ed25519 signatures of the same message differ")
	}
	if !bytes.HasPrefix(a, []byte("-----BEGIN SSH SIGNATURE-----\n")) {
		t.Errorf("signature not armored: %q", a[:30])
	}
	if _, err := signTagManifest(Signer{}, []byte("x")); err == nil {
		t.Error("signed without a key")
	}
}
