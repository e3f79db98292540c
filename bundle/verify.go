package bundle

import (
	"fmt"
	"sort"
	"strings"

	"golang.org/x/crypto/ssh"
)

// Kinds of [Finding].
const (
	KindMissing   = "missing"   // a listed or required member is not in the bag
	KindExtra     = "extra"     // a member no manifest lists
	KindHash      = "hash"      // a member's SHA-256 differs from its manifest's
	KindOxum      = "oxum"      // Payload-Oxum differs from the payload
	KindFormat    = "format"    // a tag file is malformed
	KindSignature = "signature" // the signature is missing, malformed or does not match
	KindSigner    = "signer"    // the signing key is not the expected signer
	KindPin       = "pin"       // the signing key is not the pinned key
)

// Finding is one problem found in a bag. Member is the path relative to the
// bag folder; Expected and Found are hashes, sizes or keys as Kind says.
type Finding struct {
	Member   string
	Kind     string
	Expected string
	Found    string
	Message  string
}

func (f Finding) String() string {
	s := f.Member + ": " + f.Message
	if f.Expected != "" || f.Found != "" {
		s += fmt.Sprintf(" (expected %s, found %s)", orNone(f.Expected), orNone(f.Found))
	}
	return s
}

func orNone(s string) string {
	if s == "" {
		return "none"
	}
	return s
}

// VerifyOptions say whose signature a bag must carry.
type VerifyOptions struct {
	// ExpectedSigner, when set, is the signer recorded in run.json: a
	// fingerprint ("SHA256:…") or a public key line ("ssh-ed25519 AAAA…").
	ExpectedSigner string
	// Pinned, when set, is the public key the signature must be made with
	// (verify --key PUB).
	Pinned ssh.PublicKey
}

// Verify checks the bag: bagit.txt; completeness (every file under data/
// listed in manifest-sha256.txt and every listed file present, nothing else
// outside data/ but the tag files); every SHA-256 in both manifests;
// Payload-Oxum; and the SSHSIG signature over tagmanifest-sha256.txt, made
// with the key the signature carries, which must match opts. It returns
// every problem found, sorted by member then kind; none means the bag is
// intact and signed as required. It does not re-run the analysis.
func (b *Bag) Verify(opts VerifyOptions) []Finding {
	var fs []Finding
	add := func(member, kind, expected, found, format string, args ...any) {
		fs = append(fs, Finding{Member: member, Kind: kind, Expected: expected, Found: found, Message: fmt.Sprintf(format, args...)})
	}

	// bagit.txt (RFC 8493, section 2.1.1).
	if d, ok := b.Files[BagItFile]; !ok {
		add(BagItFile, KindMissing, "", "", "the BagIt declaration is missing")
	} else if tags, err := parseTagFile(BagItFile, d); err != nil {
		add(BagItFile, KindFormat, "", "", "%v", err)
	} else {
		for _, want := range [][2]string{{"BagIt-Version", "1.0"}, {"Tag-File-Character-Encoding", "UTF-8"}} {
			if v, _ := tagValue(tags, want[0]); v != want[1] {
				add(BagItFile, KindFormat, want[1], v, "%s is not what fitseal writes", want[0])
			}
		}
	}

	// Payload: manifest-sha256.txt against the files under data/.
	listed := map[string]bool{}
	if d, ok := b.Files[ManifestFile]; !ok {
		add(ManifestFile, KindMissing, "", "", "the payload manifest is missing")
	} else if entries, err := parseManifest(ManifestFile, d); err != nil {
		add(ManifestFile, KindFormat, "", "", "%v", err)
	} else {
		for _, e := range entries {
			listed[e.Path] = true
			if !strings.HasPrefix(e.Path, PayloadDir+"/") {
				add(ManifestFile, KindFormat, "", "", "line %d lists %s, which is not under %s/", e.Line, e.Path, PayloadDir)
				continue
			}
			data, ok := b.Files[e.Path]
			if !ok {
				add(e.Path, KindMissing, e.Hash, "", "listed in %s but not in the bag", ManifestFile)
				continue
			}
			if got := sha256Hex(data); got != e.Hash {
				add(e.Path, KindHash, e.Hash, got, "SHA-256 differs from %s", ManifestFile)
			}
		}
	}

	// Tag files: tagmanifest-sha256.txt.
	tagListed := map[string]bool{}
	if d, ok := b.Files[TagManifestFile]; !ok {
		add(TagManifestFile, KindMissing, "", "", "the tag manifest is missing")
	} else if entries, err := parseManifest(TagManifestFile, d); err != nil {
		add(TagManifestFile, KindFormat, "", "", "%v", err)
	} else {
		for _, e := range entries {
			tagListed[e.Path] = true
			if strings.HasPrefix(e.Path, PayloadDir+"/") || e.Path == TagManifestFile || e.Path == SignatureFile {
				add(TagManifestFile, KindFormat, "", "", "line %d lists %s, which a tag manifest does not cover", e.Line, e.Path)
				continue
			}
			data, ok := b.Files[e.Path]
			if !ok {
				add(e.Path, KindMissing, e.Hash, "", "listed in %s but not in the bag", TagManifestFile)
				continue
			}
			if got := sha256Hex(data); got != e.Hash {
				add(e.Path, KindHash, e.Hash, got, "SHA-256 differs from %s", TagManifestFile)
			}
		}
		for _, p := range tagManifestCovers {
			if _, present := b.Files[p]; present && !tagListed[p] {
				add(p, KindExtra, "", "", "not listed in %s, so the signature does not cover it", TagManifestFile)
			}
		}
	}
	if _, ok := b.Files[RunFile]; !ok {
		add(RunFile, KindMissing, "", "", "the run record is missing")
	}

	// Every member must be listed (payload) or be a known tag file.
	for _, p := range b.Paths() {
		switch {
		case strings.HasPrefix(p, PayloadDir+"/"):
			if !listed[p] && b.Files[ManifestFile] != nil {
				add(p, KindExtra, "", sha256Hex(b.Files[p]), "not listed in %s", ManifestFile)
			}
		case !tagFiles[p]:
			add(p, KindExtra, "", sha256Hex(b.Files[p]), "not a member of a fitseal bag")
		}
	}

	// Payload-Oxum (RFC 8493, section 2.2.2).
	if d, ok := b.Files[BagInfoFile]; !ok {
		add(BagInfoFile, KindMissing, "", "", "the bag information is missing")
	} else if tags, err := parseTagFile(BagInfoFile, d); err != nil {
		add(BagInfoFile, KindFormat, "", "", "%v", err)
	} else if oxum, ok := tagValue(tags, "Payload-Oxum"); !ok {
		add(BagInfoFile, KindFormat, "", "", "no Payload-Oxum")
	} else if got := payloadOxum(b.Files); oxum != got {
		add(BagInfoFile, KindOxum, oxum, got, "Payload-Oxum (octets.files) differs from the payload")
	}

	fs = append(fs, b.verifySignature(opts)...)
	sort.SliceStable(fs, func(i, j int) bool {
		if fs[i].Member != fs[j].Member {
			return fs[i].Member < fs[j].Member
		}
		return fs[i].Kind < fs[j].Kind
	})
	return fs
}

// SignatureKey is the public key that the bag's signature carries, whether
// or not the signature matches; an error when there is no readable signature.
func (b *Bag) SignatureKey() (ssh.PublicKey, error) {
	sigBytes, ok := b.Files[SignatureFile]
	if !ok {
		return nil, fmt.Errorf("%s is missing", SignatureFile)
	}
	pub, err := checkSignature(b.Files[TagManifestFile], sigBytes)
	if pub != nil {
		return pub, nil
	}
	return nil, err
}

func (b *Bag) verifySignature(opts VerifyOptions) []Finding {
	sigBytes, ok := b.Files[SignatureFile]
	if !ok {
		return []Finding{{Member: SignatureFile, Kind: KindMissing, Message: "the signature is missing"}}
	}
	var fs []Finding
	pub, err := checkSignature(b.Files[TagManifestFile], sigBytes)
	if err != nil {
		fs = append(fs, Finding{Member: SignatureFile, Kind: KindSignature, Message: err.Error()})
	}
	if pub == nil {
		return fs
	}
	found := Fingerprint(pub)
	if want := opts.ExpectedSigner; want != "" {
		expected := want
		if k, _, _, _, perr := ssh.ParseAuthorizedKey([]byte(want)); perr == nil {
			expected = Fingerprint(k)
		}
		if expected != found {
			fs = append(fs, Finding{Member: SignatureFile, Kind: KindSigner, Expected: expected, Found: found,
				Message: "signed with a key other than the signer recorded in " + RunFile})
		}
	}
	if opts.Pinned != nil {
		if expected := Fingerprint(opts.Pinned); expected != found {
			fs = append(fs, Finding{Member: SignatureFile, Kind: KindPin, Expected: expected, Found: found,
				Message: "signed with a key other than the pinned one"})
		}
	}
	return fs
}
