package bundle_test

import (
	"bytes"
	"crypto/ed25519"
	"fmt"
	"time"

	"fitseal/bundle"
)

// Write a signed bundle, read it back and verify it.
func Example() {
	signer, _ := bundle.NewSigner(ed25519.NewKeyFromSeed(bytes.Repeat([]byte{42}, ed25519.SeedSize)))
	var archive bytes.Buffer
	err := bundle.WriteArchive(&archive, bundle.Contents{
		Name:    "pumps",
		Created: time.Date(2026, 12, 2, 0, 0, 0, 0, time.UTC),
		Payload: map[string][]byte{
			"inputs/fitseal.toml": []byte("name = \"pumps\"\n"),
			"results/fits.csv":    []byte("analysis,dataset,family\n"),
		},
		RunJSON:     []byte("{}\n"),
		ToolVersion: "example",
	}, signer)
	if err != nil {
		fmt.Println(err)
		return
	}
	bag, err := bundle.ReadArchive(&archive, bundle.DefaultLimits)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(bag.Name)
	for _, p := range bag.Paths() {
		fmt.Println(" ", p)
	}
	fmt.Println("findings:", len(bag.Verify(bundle.VerifyOptions{ExpectedSigner: signer.Fingerprint()})))

	// One changed byte is named with both hashes.
	bag.Files["data/results/fits.csv"][0] = 'A'
	for _, f := range bag.Verify(bundle.VerifyOptions{}) {
		fmt.Println(f.Member, f.Kind)
	}
	// Output:
	// pumps
	//   bag-info.txt
	//   bagit.txt
	//   data/inputs/fitseal.toml
	//   data/results/fits.csv
	//   manifest-sha256.txt
	//   run.json
	//   tagmanifest-sha256.txt
	//   tagmanifest-sha256.txt.sig
	// findings: 0
	// data/results/fits.csv hash
}
