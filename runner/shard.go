package runner

import (
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"strconv"
	"strings"
)

// ShardAssignment describes, for the record, how an analysis is assigned to
// a shard.
const ShardAssignment = `analysis NAME (after split_by) belongs to shard (first 8 bytes of SHA-256("fitseal shard v1\x00" + NAME) as a big-endian uint64) mod N`

// Shard is one slice I (0-based) of a plan cut into N.
type Shard struct {
	Index int `json:"index"`
	Count int `json:"count"`
}

// String is "I/N".
func (s Shard) String() string { return strconv.Itoa(s.Index) + "/" + strconv.Itoa(s.Count) }

// ParseShard reads "I/N" with 0 ≤ I < N.
func ParseShard(s string) (Shard, error) {
	i, n, ok := strings.Cut(s, "/")
	if !ok {
		return Shard{}, fmt.Errorf("shard %q: write it as I/N, e.g. 0/4 (I counts from 0)", s)
	}
	idx, err1 := strconv.Atoi(strings.TrimSpace(i))
	cnt, err2 := strconv.Atoi(strings.TrimSpace(n))
	if err1 != nil || err2 != nil {
		return Shard{}, fmt.Errorf("shard %q: I and N must be whole numbers, e.g. 0/4", s)
	}
	sh := Shard{Index: idx, Count: cnt}
	return sh, sh.Check()
}

// Check reports whether 0 ≤ I < N.
func (s Shard) Check() error {
	if s.Count < 1 {
		return fmt.Errorf("shard %s: the count N must be at least 1", s)
	}
	if s.Index < 0 || s.Index >= s.Count {
		return fmt.Errorf("shard %s: the index I must be between 0 and %d (it counts from 0)", s, s.Count-1)
	}
	return nil
}

// ShardOf is the shard (of n) that holds the analysis: the first 8 bytes of
// SHA-256("fitseal shard v1\x00" + name), big-endian, modulo n. It depends on
// the name alone, so adding or removing other analyses moves none.
func ShardOf(name string, n int) int {
	sum := sha256.Sum256([]byte("fitseal shard v1\x00" + name))
	return int(binary.BigEndian.Uint64(sum[:8]) % uint64(n))
}

// Holds reports whether the shard holds the analysis.
func (s Shard) Holds(name string) bool { return ShardOf(name, s.Count) == s.Index }

// Only returns the plan restricted to the shard's analyses, in plan order.
func (pl *Plan) Only(s Shard) *Plan {
	out := &Plan{}
	for _, pa := range pl.Analyses {
		if !s.Holds(pa.Name) {
			continue
		}
		idx := len(out.Analyses)
		out.Analyses = append(out.Analyses, pa)
		for _, f := range pa.Candidates.Families {
			out.Tasks = append(out.Tasks, Task{Analysis: idx, Family: f})
		}
	}
	return out
}

// Names lists the plan's analyses in order.
func (pl *Plan) Names() []string {
	out := make([]string, len(pl.Analyses))
	for i, pa := range pl.Analyses {
		out[i] = pa.Name
	}
	return out
}

// PlanIdentity is the SHA-256 (hex) of the plan's analysis names, each
// followed by a NUL byte, in plan order: two runs of the same plan agree on it.
func PlanIdentity(names []string) string {
	h := sha256.New()
	for _, n := range names {
		h.Write([]byte(n))
		h.Write([]byte{0})
	}
	return fmt.Sprintf("%x", h.Sum(nil))
}
