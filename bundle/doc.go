// Package bundle writes and reads fitseal's sealed bundles: a BagIt 1.0 bag
// (Kunze et al., 2018, RFC 8493) holding the inputs, the results and run.json,
// signed with an OpenSSH SSHSIG signature over its tag manifest, and
// serialised as one deterministic gzip-compressed POSIX tar file or left as a
// plain folder.
//
// # Writing
//
// [Write] builds the bag in memory from the payload (paths under data/) and
// run.json, hashes every member (SHA-256), signs tagmanifest-sha256.txt with a
// [Signer] and writes the archive or folder to a temporary name in the target
// folder, syncs it and renames it into place. The same inputs, key and created
// time give byte-identical output.
//
// # Reading
//
// [Open] reads a .tar.gz bundle or a bag folder into memory with the checks of
// [Limits]: no absolute paths, no "..", no links, devices or FIFOs, no
// duplicate names, one top folder, and bounded entry count and sizes. A
// refused archive gives an [*ArchiveError]. [Bag.Verify] then checks BagIt
// completeness, every hash, Payload-Oxum and the signature, and returns each
// problem as a [Finding] naming the member with the expected and found values.
// [Extract] unpacks a bundle into a folder with the same checks.
//
// # Keys and provenance
//
// [GenerateKey], [LoadSigner] and [ResolveKey] handle Ed25519 signing keys in
// OpenSSH format; [GitProvenance] records the git commit that holds the
// project and whether each input is committed unmodified.
package bundle
