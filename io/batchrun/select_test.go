package batchrun

import (
	"fmt"
	"testing"

	"dlsbatch/io/csvdata"
)

// TestSelect: a pattern without '/' matches the file name, one with '/'
// the path below the root; includes narrow, excludes drop (path.Match
// semantics).
func TestSelect(t *testing.T) {
	root := "/data"
	f := &csvdata.Found{Files: []string{"/data/night1/a_ref.csv", "/data/night1/b.csv", "/data/night2/a_ref.csv", "/data/c.CSV"}}
	for _, tc := range []struct {
		include, exclude []string
		want             int
	}{
		{nil, nil, 4},
		{[]string{"a_*"}, nil, 2},
		{[]string{"night1/*"}, nil, 2},
		{nil, []string{"*_ref.csv"}, 2},
		{[]string{"night2/*"}, []string{"a_*"}, 0},
		{[]string{"*.CSV"}, nil, 1},
	} {
		if got := len(Select(f, root, tc.include, tc.exclude).Files); got != tc.want {
			t.Errorf("include %v exclude %v: %d files, want %d", tc.include, tc.exclude, got, tc.want)
		}
	}
	if CheckPatterns([]string{"*.csv"}, []string{"["}) == nil {
		t.Error("malformed pattern accepted")
	}
}

// TestShards: every file lands in exactly one shard, the split is stable
// (a function of the relative path only) and roughly even (1,000 names
// over 4 shards: each within 250 ± 60, about 4.5 binomial SDs), and the
// array-job variables give the shard.
func TestShards(t *testing.T) {
	s := Shard{Count: 4}
	counts := make([]int, 4)
	for i := range 1000 {
		k := s.Of(fmt.Sprintf("night%d/run%03d.csv", i%7, i))
		if k2 := s.Of(fmt.Sprintf("night%d/run%03d.csv", i%7, i)); k != k2 {
			t.Fatal("shard of a path not stable")
		}
		counts[k]++
	}
	for k, c := range counts {
		if c < 190 || c > 310 {
			t.Errorf("shard %d holds %d of 1000", k, c)
		}
	}
	env := func(m map[string]string) func(string) string { return func(k string) string { return m[k] } }
	for _, tc := range []struct {
		arg  string
		env  map[string]string
		want Shard
		ok   bool
	}{
		{"2/4", nil, Shard{2, 4}, true},
		{"4/4", nil, Shard{}, false},
		{"auto", map[string]string{"SLURM_ARRAY_TASK_ID": "3", "SLURM_ARRAY_TASK_COUNT": "4", "SLURM_ARRAY_TASK_MIN": "0"}, Shard{3, 4}, true},
		{"auto", map[string]string{"SLURM_ARRAY_TASK_ID": "11", "SLURM_ARRAY_TASK_COUNT": "4", "SLURM_ARRAY_TASK_MIN": "10"}, Shard{1, 4}, true},
		{"auto/5", map[string]string{"JOB_COMPLETION_INDEX": "4"}, Shard{4, 5}, true},
		{"auto", map[string]string{"JOB_COMPLETION_INDEX": "4"}, Shard{}, false},
		{"auto", nil, Shard{}, false},
	} {
		got, err := ShardFromEnv(tc.arg, env(tc.env))
		if (err == nil) != tc.ok || got != tc.want {
			t.Errorf("%s %v: %v, %v; want %v (ok %v)", tc.arg, tc.env, got, err, tc.want, tc.ok)
		}
	}
}
