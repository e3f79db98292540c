package bundle

import (
	"bytes"
	"errors"
	"fmt"

	"github.com/hiddeco/sshsig"
	"golang.org/x/crypto/ssh"
)

// Namespace is the SSHSIG namespace of fitseal's signatures; a signature made
// for another purpose (git commits, files) cannot pass for a bundle's.
const Namespace = "fitseal"

// signatureHash is the hash inside the SSHSIG signature, SHA-512 as
// ssh-keygen -Y sign uses by default (OpenSSH PROTOCOL.sshsig).
const signatureHash = sshsig.HashSHA512

// signTagManifest signs the tag manifest's bytes and returns the armored
// SSHSIG signature ("-----BEGIN SSH SIGNATURE-----"), which
// 'ssh-keygen -Y verify -n fitseal' accepts.
func signTagManifest(s Signer, tagManifest []byte) ([]byte, error) {
	if s.IsZero() {
		return nil, errors.New("no signing key")
	}
	sig, err := sshsig.Sign(bytes.NewReader(tagManifest), s.s, signatureHash, Namespace)
	if err != nil {
		return nil, fmt.Errorf("signing %s: %w", TagManifestFile, err)
	}
	return sshsig.Armor(sig), nil
}

// checkSignature verifies an armored SSHSIG signature over message against
// the public key that the signature carries, and returns that key. The
// namespace must be "fitseal" and the hash SHA-512.
func checkSignature(message, armored []byte) (ssh.PublicKey, error) {
	sig, err := sshsig.Unarmor(armored)
	if err != nil {
		return nil, fmt.Errorf("not an SSH signature: %w", err)
	}
	if sig.Namespace != Namespace {
		return sig.PublicKey, fmt.Errorf("signature namespace is %q, want %q", sig.Namespace, Namespace)
	}
	if sig.HashAlgorithm != signatureHash {
		return sig.PublicKey, fmt.Errorf("signature hash is %s, want %s", sig.HashAlgorithm, signatureHash)
	}
	if err := sshsig.Verify(bytes.NewReader(message), sig, sig.PublicKey, sig.HashAlgorithm, Namespace); err != nil {
		return sig.PublicKey, fmt.Errorf("signature does not match %s: %w", TagManifestFile, err)
	}
	return sig.PublicKey, nil
}
