package batchrun

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"path"
	"sort"
	"strconv"
	"strings"

	"dlsbatch/io/csvdata"
	"dlsbatch/io/report"
)

// Select keeps the files found whose path relative to the input root
// matches an include pattern (all, when there is none) and no exclude
// pattern. A pattern with a '/' matches the whole relative path, one
// without matches the file's name alone (path.Match syntax: * ? [...]).
// Input problems are kept: they name paths the user asked for.
func Select(f *csvdata.Found, root string, include, exclude []string) *csvdata.Found {
	if len(include) == 0 && len(exclude) == 0 {
		return f
	}
	out := &csvdata.Found{Problems: f.Problems}
	nm := csvdata.NewNamer(root)
	for _, file := range f.Files {
		rel := nm.Rel(file)
		if (len(include) == 0 || matchAny(include, rel)) && !matchAny(exclude, rel) {
			out.Files = append(out.Files, file)
		}
	}
	return out
}

func matchAny(patterns []string, rel string) bool {
	for _, p := range patterns {
		name := rel
		if !strings.Contains(p, "/") {
			name = path.Base(rel)
		}
		if ok, _ := path.Match(p, name); ok {
			return true
		}
	}
	return false
}

// CheckPatterns reports the first malformed glob pattern of the lists.
func CheckPatterns(lists ...[]string) error {
	for _, l := range lists {
		for _, p := range l {
			if _, err := path.Match(p, ""); err != nil {
				return fmt.Errorf("pattern %q: %w", p, err)
			}
		}
	}
	return nil
}

// Shard is part K of a batch split N ways (Count ≤ 1: the whole batch).
type Shard struct{ Index, Count int }

// ParseShard reads "K/N" (0 ≤ K < N).
func ParseShard(s string) (Shard, error) {
	k, n, ok := strings.Cut(s, "/")
	ki, err1 := strconv.Atoi(k)
	ni, err2 := strconv.Atoi(n)
	if !ok || err1 != nil || err2 != nil || ni < 1 || ki < 0 || ki >= ni {
		return Shard{}, fmt.Errorf("shard %q: want K/N with 0 ≤ K < N, e.g. 0/4", s)
	}
	return Shard{ki, ni}, nil
}

// ShardFromEnv reads the shard of an array job: "auto" takes K from
// SLURM_ARRAY_TASK_ID (less SLURM_ARRAY_TASK_MIN) and N from
// SLURM_ARRAY_TASK_COUNT, or K from a Kubernetes Indexed Job's
// JOB_COMPLETION_INDEX with N given as "auto/N". getenv is os.Getenv in
// the command.
func ShardFromEnv(s string, getenv func(string) string) (Shard, error) {
	n := 0
	if rest, ok := strings.CutPrefix(s, "auto/"); ok {
		v, err := strconv.Atoi(rest)
		if err != nil || v < 1 {
			return Shard{}, fmt.Errorf("shard %q: want auto or auto/N", s)
		}
		n = v
	} else if s != "auto" {
		return ParseShard(s)
	}
	num := func(key string) (int, bool) {
		v, err := strconv.Atoi(getenv(key))
		return v, err == nil
	}
	k, haveK := num("SLURM_ARRAY_TASK_ID")
	if haveK {
		if lo, ok := num("SLURM_ARRAY_TASK_MIN"); ok {
			k -= lo
		}
		if c, ok := num("SLURM_ARRAY_TASK_COUNT"); ok && n == 0 {
			n = c
		}
	} else if k, haveK = num("JOB_COMPLETION_INDEX"); !haveK {
		return Shard{}, errors.New("--shard auto: neither SLURM_ARRAY_TASK_ID nor JOB_COMPLETION_INDEX is set")
	}
	if n == 0 {
		return Shard{}, errors.New("--shard auto: the number of shards is unknown (SLURM_ARRAY_TASK_COUNT unset): give --shard auto/N")
	}
	return ParseShard(fmt.Sprintf("%d/%d", k, n))
}

// Of returns the shard a file belongs to: its path relative to the input
// root, hashed (SHA-256, first 8 bytes), modulo Count. All runs of one file
// stay together, and the split depends neither on the machine nor on the
// order of discovery.
func (s Shard) Of(rel string) int {
	h := sha256.Sum256([]byte(rel))
	return int(binary.BigEndian.Uint64(h[:8]) % uint64(s.Count))
}

// Part keeps the files and input problems of this shard.
func (s Shard) Part(f *csvdata.Found, root string) *csvdata.Found {
	if s.Count <= 1 {
		return f
	}
	out := &csvdata.Found{}
	nm := csvdata.NewNamer(root)
	for _, file := range f.Files {
		if s.Of(nm.Rel(file)) == s.Index {
			out.Files = append(out.Files, file)
		}
	}
	for _, p := range f.Problems {
		if s.Of(p.File) == s.Index { // problems are named relative to the root already
			out.Problems = append(out.Problems, p)
		}
	}
	return out
}

// Info records the shard and the whole batch it is part of, for merge.
func (s Shard) Info(all *csvdata.Found, root string) *report.ShardInfo {
	rels := RelPaths(all, root)
	sort.Strings(rels)
	h := sha256.New()
	for _, r := range rels {
		h.Write([]byte(r + "\n"))
	}
	return &report.ShardInfo{Index: s.Index, Count: s.Count, BatchInputs: len(rels), BatchSHA256: hex.EncodeToString(h.Sum(nil))}
}

// RelPaths lists the inputs of f (files and problems) by their path
// relative to the root, in the order the run analyses them: sorted.
func RelPaths(f *csvdata.Found, root string) []string {
	var rels []string
	nm := csvdata.NewNamer(root)
	for _, file := range f.Files {
		rels = append(rels, nm.Rel(file))
	}
	for _, p := range f.Problems {
		rels = append(rels, p.File) // named relative to the root already
	}
	sort.Strings(rels)
	return rels
}
