package output

import (
	"fmt"
	"path/filepath"
	"strings"
)

// Names of map files (the partial file of a map being computed, the files
// of its shards) and which points a shard holds.

// PartialSuffix is appended to a map file's final name while it is being
// computed.
const PartialSuffix = ".partial"

// PartialName returns the name under which the map file final is computed.
func PartialName(final string) string { return final + PartialSuffix }

// ShardName returns the file name of shard i of n of the map file final:
// "map.h5" → "map.shard-1-of-4.h5" (shards are numbered from 0).
func ShardName(final string, i, n int) string {
	ext := filepath.Ext(final)
	return fmt.Sprintf("%s.shard-%d-of-%d%s", strings.TrimSuffix(final, ext), i, n, ext)
}

// owns reports whether linear point index p belongs to the spec's shard.
func (s MapSpec) owns(p int) bool {
	return s.Shards <= 1 || p%s.Shards == s.Shard
}

// ShardPoints returns the number of points of the spec's shard (all points
// when the map is not sharded).
func (s MapSpec) ShardPoints() int {
	nx, ny := s.Sweep.Shape()
	n := nx * ny
	if s.Shards <= 1 {
		return n
	}
	if s.Shard >= n {
		return 0
	}
	return (n-1-s.Shard)/s.Shards + 1
}

func shardText(s MapSpec) string {
	if s.Shards <= 0 {
		return "none"
	}
	return fmt.Sprintf("%d/%d", s.Shard, s.Shards)
}
