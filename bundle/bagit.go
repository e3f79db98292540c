package bundle

import (
	"cmp"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"runtime/debug"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"fitseal/runner"
)

// The members of a bag outside its payload folder (SPEC.md, "The bundle").
const (
	BagItFile       = "bagit.txt"
	BagInfoFile     = "bag-info.txt"
	ManifestFile    = "manifest-sha256.txt"
	TagManifestFile = "tagmanifest-sha256.txt"
	SignatureFile   = "tagmanifest-sha256.txt.sig"
	RunFile         = "run.json"
	PayloadDir      = "data"
)

// bagItDeclaration is bagit.txt for BagIt 1.0 (RFC 8493, section 2.1.1).
const bagItDeclaration = "BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n"

// tagManifestCovers are the members that tagmanifest-sha256.txt lists, in
// its (sorted) order. The signature is over the tag manifest itself, so
// neither of those two is listed.
var tagManifestCovers = []string{BagInfoFile, BagItFile, ManifestFile, RunFile}

// tagFiles are all members allowed outside data/.
var tagFiles = map[string]bool{
	BagItFile: true, BagInfoFile: true, ManifestFile: true,
	TagManifestFile: true, SignatureFile: true, RunFile: true,
}

// ToolVersion is fitseal's version from the build information: the module
// version for an installed release, "(devel)" for a build from a checkout.
func ToolVersion() string {
	if bi, ok := debug.ReadBuildInfo(); ok && bi.Main.Version != "" {
		return bi.Main.Version
	}
	return "(devel)"
}

// encodeManifestPath percent-encodes the three characters that RFC 8493
// (section 2.1.3) requires in manifest paths: CR, LF and "%".
func encodeManifestPath(p string) string {
	if !strings.ContainsAny(p, "%\r\n") {
		return p
	}
	return manifestPathEncoder.Replace(p)
}

var manifestPathEncoder = strings.NewReplacer("%", "%25", "\r", "%0D", "\n", "%0A")

// decodeManifestPath reverses encodeManifestPath; other escapes are kept as
// written, as the RFC defines no others.
func decodeManifestPath(p string) string {
	if !strings.Contains(p, "%") {
		return p
	}
	return manifestPathDecoder.Replace(p)
}

var manifestPathDecoder = strings.NewReplacer("%0D", "\r", "%0d", "\r", "%0A", "\n", "%0a", "\n", "%25", "%")

// sha256Hex is the lower-case hex SHA-256 of b.
func sha256Hex(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// manifest writes "HASH  PATH" lines sorted by path (RFC 8493, section 2.1.3).
func manifest(files map[string][]byte, paths []string) []byte {
	return manifestOn(1, files, paths, nil)
}

// manifestOn is manifest with the files hashed on at most workers
// goroutines, taking the hex SHA-256 of a path from known where it is
// there; the lines do not depend on workers.
func manifestOn(workers int, files map[string][]byte, paths []string, known map[string]string) []byte {
	sorted := append([]string(nil), paths...)
	sort.Strings(sorted)
	sums := sha256All(workers, files, sorted, known)
	size := 0
	for i, p := range sorted {
		size += len(sums[i]) + 2 + len(p) + 1
	}
	b := make([]byte, 0, size)
	for i, p := range sorted {
		b = append(b, sums[i]...)
		b = append(b, "  "...)
		b = append(b, encodeManifestPath(p)...)
		b = append(b, '\n')
	}
	return b
}

// sha256All returns the hex SHA-256 of files[p] for each of paths, in
// order: known[p] where it is there, else hashed on at most workers
// goroutines (at least one). The largest files are hashed first, so that
// one large file (results.json: half the bytes of a batch run's results)
// does not start last and leave the other goroutines idle while it is
// hashed.
func sha256All(workers int, files map[string][]byte, paths []string, known map[string]string) []string {
	sums := make([]string, len(paths))
	type file struct {
		i    int
		data []byte
	}
	var todo []file
	for i, p := range paths {
		if s, ok := known[p]; ok {
			sums[i] = s
		} else {
			todo = append(todo, file{i, files[p]})
		}
	}
	slices.SortStableFunc(todo, func(a, b file) int { return cmp.Compare(len(b.data), len(a.data)) })
	runner.ForEach(workers, len(todo), func(k int) {
		sums[todo[k].i] = sha256Hex(todo[k].data)
	})
	return sums
}

// manifestEntry is one line of a manifest.
type manifestEntry struct {
	Line int
	Hash string
	Path string
}

// parseManifest reads a manifest-sha256.txt or tagmanifest-sha256.txt. Each
// line is a 64-digit hex SHA-256, whitespace, and a path; a malformed line
// or a path listed twice is an error naming the line.
func parseManifest(name string, b []byte) ([]manifestEntry, error) {
	var out []manifestEntry
	seen := map[string]int{}
	text := strings.TrimSuffix(string(b), "\n")
	if text == "" {
		return nil, nil
	}
	for i, line := range strings.Split(text, "\n") {
		line = strings.TrimSuffix(line, "\r")
		hash, p, ok := strings.Cut(line, " ")
		if !ok {
			hash, p, ok = strings.Cut(line, "\t")
		}
		p = strings.TrimLeft(p, " \t")
		if !ok || p == "" {
			return nil, fmt.Errorf("%s:%d: want \"SHA256  PATH\", got %q", name, i+1, line)
		}
		if _, err := hex.DecodeString(hash); err != nil || len(hash) != 64 {
			return nil, fmt.Errorf("%s:%d: %q is not a SHA-256 in hex", name, i+1, hash)
		}
		p = decodeManifestPath(p)
		if err := checkMemberPath(p); err != nil {
			return nil, fmt.Errorf("%s:%d: %v", name, i+1, err)
		}
		if first, dup := seen[p]; dup {
			return nil, fmt.Errorf("%s:%d: %s is listed again (first on line %d)", name, i+1, p, first)
		}
		seen[p] = i + 1
		out = append(out, manifestEntry{Line: i + 1, Hash: strings.ToLower(hash), Path: p})
	}
	return out, nil
}

// payloadOxum is "OCTETS.COUNT" over the payload (RFC 8493, section 2.2.2).
func payloadOxum(files map[string][]byte) string {
	var octets, count int64
	for p, b := range files {
		if strings.HasPrefix(p, PayloadDir+"/") {
			octets += int64(len(b))
			count++
		}
	}
	return strconv.FormatInt(octets, 10) + "." + strconv.FormatInt(count, 10)
}

// bagInfo writes bag-info.txt with the reserved elements of RFC 8493
// (section 2.2.2) that fitseal fills: the software that made the bag, the
// date (UTC) it was made, a description of its contents and the
// Payload-Oxum. A multi-line description is folded onto continuation lines
// that start with two spaces.
func bagInfo(created time.Time, description, toolVersion, oxum string) []byte {
	var b strings.Builder
	fmt.Fprintf(&b, "Bag-Software-Agent: fitseal %s\n", toolVersion)
	fmt.Fprintf(&b, "Bagging-Date: %s\n", created.UTC().Format("2006-01-02"))
	if d := strings.TrimSpace(description); d != "" {
		d = strings.ReplaceAll(strings.ReplaceAll(d, "\r\n", "\n"), "\r", "\n")
		fmt.Fprintf(&b, "External-Description: %s\n", strings.ReplaceAll(d, "\n", "\n  "))
	}
	fmt.Fprintf(&b, "Payload-Oxum: %s\n", oxum)
	return []byte(b.String())
}

// parseTagFile reads a "Label: value" tag file (bagit.txt, bag-info.txt);
// lines that start with a space or tab continue the previous value.
func parseTagFile(name string, b []byte) ([][2]string, error) {
	var out [][2]string
	text := strings.TrimSuffix(string(b), "\n")
	for i, line := range strings.Split(text, "\n") {
		line = strings.TrimSuffix(line, "\r")
		if line != "" && (line[0] == ' ' || line[0] == '\t') && len(out) > 0 {
			out[len(out)-1][1] += "\n" + strings.TrimLeft(line, " \t")
			continue
		}
		label, value, ok := strings.Cut(line, ":")
		if !ok || strings.TrimSpace(label) == "" {
			return nil, fmt.Errorf("%s:%d: want \"Label: value\", got %q", name, i+1, line)
		}
		out = append(out, [2]string{strings.TrimSpace(label), strings.TrimSpace(value)})
	}
	return out, nil
}

// tagValue is the first value of label, case-insensitively (RFC 8493 labels
// are case-insensitive), and whether it was there.
func tagValue(tags [][2]string, label string) (string, bool) {
	for _, t := range tags {
		if strings.EqualFold(t[0], label) {
			return t[1], true
		}
	}
	return "", false
}

// bagContents is what a bag is made from.
type bagContents struct {
	Payload     map[string][]byte   // paths relative to data/
	Disk        map[string]DiskFile // paths relative to data/, copied from disk
	RunJSON     []byte
	Created     time.Time
	Description string
	ToolVersion string
	Workers     int // goroutines hashing the payload (0: one)
	// Known holds hex SHA-256s already taken, by path relative to data/.
	Known map[string]string
}

// buildBag makes every member of a bag except the signature: the payload
// under data/, run.json, and the tag files that describe and hash them.
// Files copied from disk are returned apart, by bag path; the manifest
// lists their recorded SHA-256, which the copy is checked against.
func buildBag(c bagContents) (map[string][]byte, map[string]DiskFile, error) {
	files := make(map[string][]byte, len(c.Payload)+6)
	disk := make(map[string]DiskFile, len(c.Disk))
	known := make(map[string]string, len(c.Known)+len(c.Disk))
	payloadPaths := make([]string, 0, len(c.Payload)+len(c.Disk))
	var octets int64
	for p, b := range c.Payload {
		if err := checkMemberPath(p); err != nil {
			return nil, nil, fmt.Errorf("payload: %w", err)
		}
		full := PayloadDir + "/" + p
		files[full] = b
		payloadPaths = append(payloadPaths, full)
		octets += int64(len(b))
		if s, ok := c.Known[p]; ok {
			known[full] = s
		}
	}
	for p, d := range c.Disk {
		if err := checkMemberPath(p); err != nil {
			return nil, nil, fmt.Errorf("payload: %w", err)
		}
		if _, dup := c.Payload[p]; dup {
			return nil, nil, fmt.Errorf("payload: %s is given both as bytes and as a file on disk", p)
		}
		full := PayloadDir + "/" + p
		disk[full] = d
		payloadPaths = append(payloadPaths, full)
		octets += d.Size
		known[full] = d.hex()
	}
	if len(c.RunJSON) == 0 {
		return nil, nil, fmt.Errorf("%s is empty", RunFile)
	}
	files[RunFile] = c.RunJSON
	// run.json (megabytes in a large run) is hashed for the tag manifest
	// while the payload is hashed for the manifest.
	runSum := make(chan string, 1)
	go func() { runSum <- sha256Hex(c.RunJSON) }()
	files[BagItFile] = []byte(bagItDeclaration)
	files[ManifestFile] = manifestOn(c.Workers, files, payloadPaths, known)
	oxum := strconv.FormatInt(octets, 10) + "." + strconv.Itoa(len(payloadPaths))
	files[BagInfoFile] = bagInfo(c.Created, c.Description, c.ToolVersion, oxum)
	files[TagManifestFile] = manifestOn(1, files, tagManifestCovers, map[string]string{RunFile: <-runSum})
	return files, disk, nil
}
