package bundle

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

func TestWriteKeyPair(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "k")
	s, err := WriteKeyPair(p, "test key")
	if err != nil {
		t.Fatal(err)
	}
	for file, mode := range map[string]os.FileMode{p: 0o600, p + ".pub": 0o644} {
		fi, err := os.Stat(file)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != mode {
			t.Errorf("%s: mode %v, want %v", file, fi.Mode().Perm(), mode)
		}
	}
	loaded, err := LoadSigner(p)
	if err != nil {
		t.Fatal(err)
	}
	if loaded.Fingerprint() != s.Fingerprint() {
		t.Errorf("loaded key %s, written %s", loaded.Fingerprint(), s.Fingerprint())
	}
	pub, err := ReadPublicKey(p + ".pub")
	if err != nil {
		t.Fatal(err)
	}
	if Fingerprint(pub) != s.Fingerprint() {
		t.Errorf(".pub holds %s, want %s", Fingerprint(pub), s.Fingerprint())
	}
	if !strings.HasPrefix(s.Fingerprint(), "SHA256:") || len(s.Fingerprint()) != len("SHA256:")+43 {
		t.Errorf("fingerprint %q is not SHA256: and 43 base64 digits", s.Fingerprint())
	}
	before, _ := os.ReadFile(p)
	if _, err := WriteKeyPair(p, ""); !errors.Is(err, ErrExists) {
		t.Errorf("second keygen to the same file: %v, want ErrExists", err)
	}
	if after, _ := os.ReadFile(p); !bytes.Equal(before, after) {
		t.Error("existing key was changed")
	}
	// Only the .pub exists: still refused, and no private key is left behind.
	q := filepath.Join(dir, "q")
	os.WriteFile(q+".pub", []byte("x"), 0o644)
	if _, err := WriteKeyPair(q, ""); !errors.Is(err, ErrExists) {
		t.Errorf("keygen over an existing .pub: %v, want ErrExists", err)
	}
	if _, err := os.Stat(q); !os.IsNotExist(err) {
		t.Errorf("private key written although the .pub existed")
	}
}

func TestLoadSignerErrors(t *testing.T) {
	dir := t.TempDir()
	pubOnly := filepath.Join(dir, "k")
	if _, err := WriteKeyPair(pubOnly, ""); err != nil {
		t.Fatal(err)
	}
	garbage := filepath.Join(dir, "garbage")
	os.WriteFile(garbage, []byte("not a key\n"), 0o600)
	for _, tc := range []struct {
		name, path, want string
	}{
		{"missing", filepath.Join(dir, "nope"), "no such file"},
		{"public key given", pubOnly + ".pub", "is a public key"},
		{"garbage", garbage, "not an OpenSSH private key"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := LoadSigner(tc.path)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

// TestSSHKeygenKeys: keys made by OpenSSH's ssh-keygen load (Ed25519,
// unencrypted) or are refused with a clear error (encrypted, ECDSA); the
// fingerprint matches 'ssh-keygen -l'.
func TestSSHKeygenKeys(t *testing.T) {
	keygen := needSSHKeygen(t)
	dir := t.TempDir()
	mk := func(name string, args ...string) string {
		p := filepath.Join(dir, name)
		cmd := exec.Command(keygen, append([]string{"-q", "-f", p, "-C", "ci"}, args...)...)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("ssh-keygen %v: %v\n%s", args, err, out)
		}
		return p
	}
	plain := mk("ed", "-t", "ed25519", "-N", "")
	s, err := LoadSigner(plain)
	if err != nil {
		t.Fatalf("ssh-keygen's unencrypted Ed25519 key refused: %v", err)
	}
	out, err := exec.Command(keygen, "-l", "-E", "sha256", "-f", plain+".pub").Output()
	if err != nil {
		t.Fatal(err)
	}
	if fields := strings.Fields(string(out)); len(fields) < 2 || fields[1] != s.Fingerprint() {
		t.Errorf("ssh-keygen -l says %q, fitseal says %s", out, s.Fingerprint())
	}

	enc := mk("enc", "-t", "ed25519", "-a", "1", "-N", "correct horse")
	if _, err := LoadSigner(enc); !errors.Is(err, ErrEncryptedKey) || !strings.Contains(err.Error(), "fitseal keygen") {
		t.Errorf("encrypted key: %v, want ErrEncryptedKey with a hint", err)
	}
	ecdsa := mk("ecdsa", "-t", "ecdsa", "-N", "")
	if _, err := LoadSigner(ecdsa); err == nil || !strings.Contains(err.Error(), "Ed25519") {
		t.Errorf("ECDSA key: %v, want a refusal naming Ed25519", err)
	}
}

func TestResolveKey(t *testing.T) {
	dir := t.TempDir()
	env := map[string]string{"XDG_CONFIG_HOME": filepath.Join(dir, "config"), "HOME": filepath.Join(dir, "home")}
	getenv := func(k string) string { return env[k] }

	// Default key: created on first use with a note, reused silently after.
	var stderr bytes.Buffer
	s1, p1, err := ResolveKey("", getenv, &stderr)
	if err != nil {
		t.Fatal(err)
	}
	wantPath := filepath.Join(dir, "config", "fitseal", "id_ed25519")
	if p1 != wantPath {
		t.Errorf("default key at %s, want %s", p1, wantPath)
	}
	if !strings.Contains(stderr.String(), "created a new signing key "+wantPath) {
		t.Errorf("stderr %q does not say the key was created", stderr.String())
	}
	if fi, _ := os.Stat(p1); fi.Mode().Perm() != 0o600 {
		t.Errorf("default key mode %v, want 0600", fi.Mode().Perm())
	}
	if fi, _ := os.Stat(filepath.Dir(p1)); fi.Mode().Perm() != 0o700 {
		t.Errorf("key folder mode %v, want 0700", fi.Mode().Perm())
	}
	stderr.Reset()
	s2, _, err := ResolveKey("", getenv, &stderr)
	if err != nil || s2.Fingerprint() != s1.Fingerprint() || stderr.Len() != 0 {
		t.Errorf("second resolve: %v, key %s vs %s, stderr %q", err, s2.Fingerprint(), s1.Fingerprint(), stderr.String())
	}

	// Without XDG_CONFIG_HOME (or with a relative one): ~/.config.
	delete(env, "XDG_CONFIG_HOME")
	env["XDG_CONFIG_HOME"] = "relative/ignored"
	_, p3, err := ResolveKey("", getenv, &stderr)
	if want := filepath.Join(dir, "home", ".config", "fitseal", "id_ed25519"); err != nil || p3 != want {
		t.Errorf("HOME default: %s, %v; want %s", p3, err, want)
	}

	// --key and $FITSEAL_KEY are used as given and never created.
	other := filepath.Join(dir, "other")
	so, err := WriteKeyPair(other, "")
	if err != nil {
		t.Fatal(err)
	}
	env["FITSEAL_KEY"] = other
	if s, p, err := ResolveKey("", getenv, &stderr); err != nil || p != other || s.Fingerprint() != so.Fingerprint() {
		t.Errorf("$FITSEAL_KEY: %s %v", p, err)
	}
	if s, p, err := ResolveKey(p1, getenv, &stderr); err != nil || p != p1 || s.Fingerprint() != s1.Fingerprint() {
		t.Errorf("--key beats $FITSEAL_KEY: %s %v", p, err)
	}
	missing := filepath.Join(dir, "missing")
	if _, _, err := ResolveKey(missing, getenv, &stderr); err == nil || !strings.Contains(err.Error(), "--key") {
		t.Errorf("missing --key file: %v, want an error naming --key", err)
	}
	env["FITSEAL_KEY"] = missing
	if _, _, err := ResolveKey("", getenv, &stderr); err == nil || !strings.Contains(err.Error(), "$FITSEAL_KEY") {
		t.Errorf("missing $FITSEAL_KEY file: %v, want an error naming $FITSEAL_KEY", err)
	}
	if _, err := os.Stat(missing); !os.IsNotExist(err) {
		t.Error("a missing --key/$FITSEAL_KEY file was created")
	}
}

func TestReadPublicKeyFormats(t *testing.T) {
	s := testSigner(t)
	dir := t.TempDir()
	for name, text := range map[string]string{
		"pub":             s.AuthorizedKey() + " comment\n",
		"allowed_signers": "# signers\nreviewer@example.org " + s.AuthorizedKey() + "\n",
	} {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(text), 0o644)
		pub, err := ReadPublicKey(p)
		if err != nil || Fingerprint(pub) != s.Fingerprint() {
			t.Errorf("%s: %v", name, err)
		}
	}
	bad := filepath.Join(dir, "bad")
	os.WriteFile(bad, []byte("hello\n"), 0o644)
	if _, err := ReadPublicKey(bad); err == nil || !strings.Contains(err.Error(), "bad:1") {
		t.Errorf("bad public key file: %v, want an error naming bad:1", err)
	}
}
