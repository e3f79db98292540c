package bundle

import (
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"encoding/pem"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"golang.org/x/crypto/ssh"
)

// Signer signs bundles with an Ed25519 key. Ed25519 signatures are
// deterministic (Bernstein et al., 2012), so the same key and tag manifest
// always give the same signature bytes, which keeps bundles byte-identical.
type Signer struct {
	s ssh.Signer
}

// NewSigner wraps an Ed25519 private key.
func NewSigner(priv ed25519.PrivateKey) (Signer, error) {
	s, err := ssh.NewSignerFromKey(priv)
	if err != nil {
		return Signer{}, err
	}
	return Signer{s: s}, nil
}

// IsZero reports whether the Signer holds no key.
func (s Signer) IsZero() bool { return s.s == nil }

// PublicKey is the signer's public key.
func (s Signer) PublicKey() ssh.PublicKey { return s.s.PublicKey() }

// AuthorizedKey is the public key in OpenSSH's one-line form
// ("ssh-ed25519 AAAA..."), without comment or newline.
func (s Signer) AuthorizedKey() string { return AuthorizedKey(s.s.PublicKey()) }

// Fingerprint is the public key's SHA-256 fingerprint in OpenSSH's form
// ("SHA256:" and unpadded base64).
func (s Signer) Fingerprint() string { return ssh.FingerprintSHA256(s.s.PublicKey()) }

// AuthorizedKey is pub in OpenSSH's one-line form, without newline.
func AuthorizedKey(pub ssh.PublicKey) string {
	return strings.TrimSpace(string(ssh.MarshalAuthorizedKey(pub)))
}

// Fingerprint is pub's SHA-256 fingerprint ("SHA256:…"), as ssh-keygen -l prints it.
func Fingerprint(pub ssh.PublicKey) string { return ssh.FingerprintSHA256(pub) }

// GenerateKey makes a new Ed25519 key and returns the private key in OpenSSH
// format (PEM "OPENSSH PRIVATE KEY", unencrypted) and the public key line
// with comment, as ssh-keygen -t ed25519 writes them.
func GenerateKey(random io.Reader, comment string) (private, public []byte, signer Signer, err error) {
	if random == nil {
		random = rand.Reader
	}
	pub, priv, err := ed25519.GenerateKey(random)
	if err != nil {
		return nil, nil, Signer{}, err
	}
	block, err := ssh.MarshalPrivateKey(priv, comment)
	if err != nil {
		return nil, nil, Signer{}, err
	}
	sshPub, err := ssh.NewPublicKey(pub)
	if err != nil {
		return nil, nil, Signer{}, err
	}
	line := AuthorizedKey(sshPub)
	if comment != "" {
		line += " " + comment
	}
	signer, err = NewSigner(priv)
	return pem.EncodeToMemory(block), []byte(line + "\n"), signer, err
}

// WriteKeyPair makes a new Ed25519 key and writes it to path (mode 0600) and
// path.pub (mode 0644), each through a temporary file and a rename. It
// refuses to replace either file, and on failure leaves neither behind.
func WriteKeyPair(path, comment string) (Signer, error) {
	pubPath := path + ".pub"
	for _, p := range []string{path, pubPath} {
		if _, err := os.Lstat(p); err == nil {
			return Signer{}, fmt.Errorf("%s %w; fitseal never replaces a key: choose another file with -o", p, ErrExists)
		}
	}
	private, public, signer, err := GenerateKey(nil, comment)
	if err != nil {
		return Signer{}, err
	}
	if err := writeFileAtomic(path, false, 0o600, writeBytes(private)); err != nil {
		return Signer{}, err
	}
	if err := writeFileAtomic(pubPath, false, 0o644, writeBytes(public)); err != nil {
		os.Remove(path)
		return Signer{}, err
	}
	return signer, nil
}

func writeBytes(b []byte) func(io.Writer) error {
	return func(w io.Writer) error { _, err := w.Write(b); return err }
}

// ErrEncryptedKey is wrapped by LoadSigner's error for a key protected by a
// passphrase.
var ErrEncryptedKey = errors.New("the key is encrypted with a passphrase")

// LoadSigner reads an unencrypted OpenSSH Ed25519 private key, such as
// 'fitseal keygen' or 'ssh-keygen -t ed25519 -N ""' writes. Other key types
// are refused because their signatures are not deterministic (ECDSA) or not
// what fitseal documents; an encrypted key gets an error that says what to do.
func LoadSigner(path string) (Signer, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return Signer{}, plainf("signing key "+path, err)
	}
	s, err := ssh.ParsePrivateKey(b)
	if err != nil {
		var pm *ssh.PassphraseMissingError
		if errors.As(err, &pm) {
			return Signer{}, fmt.Errorf("signing key %s: %w; fitseal cannot prompt for it: "+
				"make a key with 'fitseal keygen', or remove the passphrase from a copy with 'ssh-keygen -p -N \"\" -f COPY'", path, ErrEncryptedKey)
		}
		if bytes.Contains(b, []byte("PUBLIC KEY")) || bytes.HasPrefix(b, []byte("ssh-")) {
			return Signer{}, fmt.Errorf("signing key %s is a public key; give the private key (the file without .pub)", path)
		}
		return Signer{}, fmt.Errorf("signing key %s: not an OpenSSH private key (%s); give the file that 'fitseal keygen' or 'ssh-keygen -t ed25519' wrote", path, plainReason(err))
	}
	if t := s.PublicKey().Type(); t != ssh.KeyAlgoED25519 {
		return Signer{}, fmt.Errorf("signing key %s is %s; fitseal signs with Ed25519 keys: make one with 'fitseal keygen' or 'ssh-keygen -t ed25519'", path, t)
	}
	return Signer{s: s}, nil
}

// ReadPublicKey reads a public key file: an OpenSSH .pub file, an
// authorized_keys line, or an allowed_signers line ("PRINCIPALS KEY"). The
// first key found is returned.
func ReadPublicKey(path string) (ssh.PublicKey, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, plainf("public key "+path, err)
	}
	for i, line := range strings.Split(string(b), "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		if pub, _, _, _, err := ssh.ParseAuthorizedKey([]byte(line)); err == nil {
			return pub, nil
		}
		// allowed_signers: the principals come first.
		if _, rest, ok := strings.Cut(line, " "); ok {
			if pub, _, _, _, err := ssh.ParseAuthorizedKey([]byte(strings.TrimSpace(rest))); err == nil {
				return pub, nil
			}
		}
		return nil, fmt.Errorf("%s:%d: not an OpenSSH public key; give the .pub file of the signing key", path, i+1)
	}
	return nil, fmt.Errorf("%s: no public key in the file", path)
}

// DefaultKeyPath is where fitseal keeps its own key:
// $XDG_CONFIG_HOME/fitseal/id_ed25519, or ~/.config/fitseal/id_ed25519 when
// XDG_CONFIG_HOME is unset or not absolute (XDG Base Directory
// Specification, 0.8). getenv is os.Getenv outside tests.
func DefaultKeyPath(getenv func(string) string) (string, error) {
	if x := getenv("XDG_CONFIG_HOME"); x != "" && filepath.IsAbs(x) {
		return filepath.Join(x, "fitseal", "id_ed25519"), nil
	}
	home := getenv("HOME")
	if home == "" {
		h, err := os.UserHomeDir()
		if err != nil {
			return "", fmt.Errorf("no place for the default signing key (%v); give one with --key or $FITSEAL_KEY", err)
		}
		home = h
	}
	return filepath.Join(home, ".config", "fitseal", "id_ed25519"), nil
}

// ResolveKey finds the signing key for 'run': flagKey (--key) if given, else
// $FITSEAL_KEY, else the default key. A --key or $FITSEAL_KEY file that does
// not exist is an error; only the default key is ever created, with mode
// 0600 in a folder of mode 0700, and a note saying so goes to stderr. It
// returns the signer and the path it was loaded from.
func ResolveKey(flagKey string, getenv func(string) string, stderr io.Writer) (Signer, string, error) {
	if getenv == nil {
		getenv = os.Getenv
	}
	if flagKey != "" {
		s, err := LoadSigner(flagKey)
		return s, flagKey, withKeyHint(err, "--key")
	}
	if env := getenv("FITSEAL_KEY"); env != "" {
		s, err := LoadSigner(env)
		return s, env, withKeyHint(err, "$FITSEAL_KEY")
	}
	path, err := DefaultKeyPath(getenv)
	if err != nil {
		return Signer{}, "", err
	}
	if _, err := os.Stat(path); err == nil {
		s, err := LoadSigner(path)
		return s, path, err
	} else if !errors.Is(err, os.ErrNotExist) {
		return Signer{}, "", plainf("signing key "+path, err)
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
		return Signer{}, "", fmt.Errorf("creating the default signing key: %w", PlainPathError(err))
	}
	s, err := WriteKeyPair(path, "fitseal")
	if err != nil {
		return Signer{}, "", fmt.Errorf("creating the default signing key: %w", err)
	}
	fmt.Fprintf(stderr, "fitseal: created a new signing key %s (%s); its public key is %s.pub\n", path, s.Fingerprint(), path)
	return s, path, nil
}

func withKeyHint(err error, from string) error {
	if err != nil && errors.Is(err, os.ErrNotExist) {
		return fmt.Errorf("%w (named by %s); make one with 'fitseal keygen -o FILE'", err, from)
	}
	return err
}
