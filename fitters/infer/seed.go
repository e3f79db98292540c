package infer

import (
	"crypto/sha256"
	"encoding/binary"
	"math/rand/v2"
	"slices"
	"strconv"
)

// Stream identifies one random stream: the master seed of the run, the
// analysis and family it serves, its purpose ("bootstrap", …) and the
// replicate number. Names never contain "|" (the project file restricts them
// to [a-z0-9._-/]), so the identity string is unambiguous.
type Stream struct {
	Master   uint64
	Analysis string
	Family   string
	Purpose  string
}

// Identity is "seed|analysis|family|purpose|replicate", the text hashed by
// StreamSeed (the seed in decimal).
func (s Stream) Identity(replicate int) string {
	return strconv.FormatUint(s.Master, 10) + "|" + s.Analysis + "|" + s.Family + "|" + s.Purpose + "|" + strconv.Itoa(replicate)
}

// StreamSeed returns the two 64-bit words seeding replicate's PCG stream:
// the first 16 bytes of SHA-256(Identity(replicate)), read big-endian.
func (s Stream) StreamSeed(replicate int) (uint64, uint64) {
	h := sha256.Sum256([]byte(s.Identity(replicate)))
	return binary.BigEndian.Uint64(h[0:8]), binary.BigEndian.Uint64(h[8:16])
}

// Rand returns replicate's random source: math/rand/v2's PCG (a specified,
// stable generator) seeded by StreamSeed.
func (s Stream) Rand(replicate int) *rand.Rand {
	a, b := s.StreamSeed(replicate)
	return rand.New(rand.NewPCG(a, b))
}

// seeder re-seeds a PCG for one replicate after another of a stream
// without allocating: the identity's text up to the replicate number is
// kept, and only the number is rewritten for each replicate.
type seeder struct {
	text   []byte
	prefix int
}

func (s Stream) seeder() *seeder {
	t := []byte(s.Identity(0))
	t = t[:len(t)-1] // drop the "0"
	return &seeder{text: slices.Grow(t, 20), prefix: len(t)}
}

// reseed seeds p for replicate as Stream.Rand(replicate) is seeded.
func (z *seeder) reseed(p *rand.PCG, replicate int) {
	z.text = strconv.AppendInt(z.text[:z.prefix], int64(replicate), 10)
	h := sha256.Sum256(z.text)
	p.Seed(binary.BigEndian.Uint64(h[0:8]), binary.BigEndian.Uint64(h[8:16]))
}
