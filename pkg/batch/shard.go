package batch

import (
	"fmt"
	"strconv"
	"strings"
)

// Shard is the K-th of N slices of a manifest (1 ≤ K ≤ N); the zero value
// and 1/1 are the whole manifest.
type Shard struct{ K, N int }

// ParseShard reads "K/N", as --shard and a scheduler's array index give it.
func ParseShard(s string) (Shard, error) {
	k, n, ok := strings.Cut(s, "/")
	ki, err1 := strconv.Atoi(strings.TrimSpace(k))
	ni, err2 := strconv.Atoi(strings.TrimSpace(n))
	if !ok || err1 != nil || err2 != nil || ni < 1 || ki < 1 || ki > ni {
		return Shard{}, fmt.Errorf("%q is not a slice K/N with 1 ≤ K ≤ N, e.g. 3/8", s)
	}
	return Shard{ki, ni}, nil
}

// Whole reports whether the shard is the whole manifest.
func (s Shard) Whole() bool { return s.N <= 1 }

func (s Shard) String() string {
	if s.Whole() {
		return "1/1"
	}
	return fmt.Sprintf("%d/%d", s.K, s.N)
}

// Of returns the slice (1 … N) that holds the reaction at manifest
// position index: reactions are dealt round-robin in manifest order, so
// the slices differ in size by at most one and the assignment depends only
// on the manifest (not on which reactions are done, on the machine or on
// the number of workers).
func Of(index, n int) int {
	if n <= 1 {
		return 1
	}
	return index%n + 1
}

// Select returns the reactions of rs in slice s, in manifest order.
func (s Shard) Select(rs []*Resolved) []*Resolved {
	if s.Whole() {
		return rs
	}
	var out []*Resolved
	for _, r := range rs {
		if Of(r.Index, s.N) == s.K {
			out = append(out, r)
		}
	}
	return out
}
