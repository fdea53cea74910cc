#!/usr/bin/env bash
# The Slurm job-array test of socmap (issue: full-GPE maps at scale).
#
# Builds bin/socmap, starts a one-node Slurm cluster on localhost
# (scripts/slurm-local.sh, which installs slurm-wlm and munge if missing),
# submits a 4-task job array of a 40 × 30-point variational map plus the
# dependent merge job through the script printed by `socmap map --sbatch`,
# waits for them (at most $SOCMAP_CLUSTER_TIMEOUT seconds, default 120),
# and checks with h5py (Debian python3-h5py, an outside reader) that the
# merged map equals a single-process run point for point: done mask all 1,
# phase codes exactly, every observable to 1e-12 (relative to max(1, |v|)),
# same axes and settings. The daemons are stopped on exit, whatever happens.
# Exit status 0 only if every check passed.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$PWD
t0=$(date +%s.%N)
timeout=${SOCMAP_CLUSTER_TIMEOUT:-120}
say() { echo "test-cluster [$(awk "BEGIN { printf \"%.1f\", $(date +%s.%N) - $t0 }") s]: $*" >&2; }

go build -o bin/socmap ./cmd/socmap
bin=$root/bin/socmap
say "built $bin"

work=$(mktemp -d "${TMPDIR:-/tmp}/socmap-cluster.XXXXXX")
export SOCMAP_SLURM_DIR=$work/slurm
ok=0
cleanup() {
  "$root/scripts/slurm-local.sh" stop || true
  if [ $ok -eq 1 ]; then
    rm -rf "$work"
  else
    say "FAILED; files kept in $work"
  fi
}
trap cleanup EXIT

"$root/scripts/slurm-local.sh" start
say "cluster up"
export SLURM_CONF=$SOCMAP_SLURM_DIR/slurm.conf

cd "$work"
map=(--omega-er 0 --G1 1 --G2 0.1 --x omega=0.01:4:40 --y G2=-0.2:0.6:30)
"$bin" map "${map[@]}" --quiet --workers 1 --out single.h5 >/dev/null
"$bin" map "${map[@]}" --out map.h5 --out map.png --sbatch --tasks 4 --cpus-per-task 1 >job.sh
say "job script:"
sed 's/^/    /' job.sh >&2
submitted=$(bash job.sh)
say "$submitted"
merge_job=$(sed -n 's/.*merge job \([0-9]*\).*/\1/p' <<<"$submitted")
[ -n "$merge_job" ] || { say "no merge job id in: $submitted"; exit 1; }

# Wait until the merge job has left the queue (or cannot run any more).
deadline=$(($(date +%s) + timeout))
while :; do
  state=$(squeue -h -j "$merge_job" -o '%T %r' 2>/dev/null || true)
  [ -z "$state" ] && break
  case "$state" in
  *DependencyNeverSatisfied*)
    say "merge job $merge_job can never run: an array task failed"
    tail -n 5 map.slurm-*.out >&2 || true
    exit 1
    ;;
  esac
  if [ "$(date +%s)" -ge "$deadline" ]; then
    say "timeout after ${timeout}s; queue:"
    squeue >&2 || true
    exit 1
  fi
  sleep 0.2
done
say "merge job done"
for f in map.slurm-*.out; do
  if [ -s "$f" ]; then
    say "$f:"
    sed 's/^/    /' "$f" >&2
  fi
done
[ -f map.h5 ] || { say "no merged map.h5"; ls -la >&2; exit 1; }
[ -s map.png ] || { say "no merged map.png"; exit 1; }
for i in 0 1 2 3; do
  [ -f "map.shard-$i-of-4.h5" ] || { say "missing shard file map.shard-$i-of-4.h5"; exit 1; }
done

/usr/bin/python3 - single.h5 map.h5 map.shard-{0,1,2,3}-of-4.h5 <<'EOF'
# Outside reader (h5py): the merged map equals the single-process run.
import sys
import h5py
import numpy as np

single, merged, shards = sys.argv[1], sys.argv[2], sys.argv[3:]
fail = []
with h5py.File(single, "r") as a, h5py.File(merged, "r") as b:
    ga, gb = a["map"], b["map"]
    names = ga.attrs["observables"].split(",")
    if gb.attrs["observables"].split(",") != names:
        fail.append("observable lists differ")
    if ga.attrs["settings"] != gb.attrs["settings"]:
        fail.append("settings attributes differ")
    if "shard" in gb.attrs or "shards" in gb.attrs:
        fail.append("merged file carries shard attributes")
    for ax in ("x", "y"):
        if not np.array_equal(ga[ax][()], gb[ax][()]):
            fail.append(f"axis {ax} differs")
    if not (ga["done"][()] == 1).all() or not (gb["done"][()] == 1).all():
        fail.append("done mask not all 1")
    pa, pb = ga["phase"][()], gb["phase"][()]
    if not np.array_equal(pa, pb):
        fail.append(f"phase codes differ at {int((pa != pb).sum())} points")
    worst = 0.0
    for n in names:
        va, vb = ga[n][()], gb[n][()]
        same_nan = np.isnan(va) == np.isnan(vb)
        if not same_nan.all():
            fail.append(f"{n}: NaN at different points")
            continue
        m = ~np.isnan(va)
        rel = np.abs(va[m] - vb[m]) / np.maximum(1.0, np.abs(va[m]))
        if rel.size:
            worst = max(worst, float(rel.max()))
        if rel.size and rel.max() > 1e-12:
            fail.append(f"{n}: largest difference {rel.max():.3g} > 1e-12")
    shape = pa.shape
    print(f"compared {pa.size} points ({shape[1]} x {shape[0]}), {len(names)} observables: "
          f"phases equal, largest relative difference {worst:.3g}")
covered = np.zeros(shape, dtype=int)
for i, s in enumerate(shards):
    with h5py.File(s, "r") as f:
        g = f["map"]
        if int(g.attrs["shard"]) != i or int(g.attrs["shards"]) != len(shards):
            fail.append(f"{s}: shard attributes {g.attrs['shard']}/{g.attrs['shards']}")
        covered += g["done"][()]
if not (covered == 1).all():
    fail.append("shards do not cover every point exactly once")
for f in fail:
    print("FAIL:", f)
sys.exit(1 if fail else 0)
EOF

ok=1
say "passed"
