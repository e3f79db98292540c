#!/usr/bin/env bash
# Simulates a sharded deployment on one machine: COUNT small datasets (invented
# lognormal draws, ROWS rows each, one split CSV) fitted as SHARDS partial
# bundles run by `xargs -P JOBS`, merged, and compared byte for byte with the
# single run. Prints the wall times of each stage.
#
#   docs/shard-simulation.sh [COUNT] [SHARDS] [JOBS]     (default 20000 16 2)
#
# ROWS (12), INTERVALS (wald) and BOOTSTRAP (0) in the environment change the
# datasets' size and the work per fit.
# Needs Go (builds fitseal into the work folder) and python3 (data only).
set -euo pipefail
COUNT=${1:-20000}
SHARDS=${2:-16}
JOBS=${3:-2}
ROWS=${ROWS:-12}
INTERVALS=${INTERVALS:-wald}
BOOTSTRAP=${BOOTSTRAP:-0}
here=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d "${TMPDIR:-/tmp}/fitseal-shards-XXXXXX")
echo "work folder: $work"
(cd "$here" && go build -o "$work/fitseal" ./cmd/fitseal)
fs="$work/fitseal"
export SOURCE_DATE_EPOCH=1764633600 FITSEAL_KEY="$work/key"
"$fs" keygen -o "$work/key" >/dev/null

mkdir -p "$work/p"
python3 - "$COUNT" "$ROWS" > "$work/p/wells.csv" <<'PY'
import math, random, sys
count, rows = int(sys.argv[1]), int(sys.argv[2])
r = random.Random(20261202)
print("well,nitrate")
for w in range(count):
    mu, sigma = r.uniform(-0.5, 1.5), r.uniform(0.3, 0.9)
    for _ in range(rows):
        print(f"w{w:05d},{math.exp(r.gauss(mu, sigma)):.4g}")
PY
cat > "$work/p/fitseal.toml" <<TOML
name = "many-wells"
[settings]
seed = 7
intervals = "$INTERVALS"
bootstrap = $BOOTSTRAP
[[dataset]]
name = "nitrate"
file = "wells.csv"
column = "nitrate"
split_by = "well"
[[candidates]]
name = "conc"
families = ["lognormal", "exponential"]
[[analysis]]
name = "nitrate"
dataset = "nitrate"
candidates = "conc"
quantiles = [0.95]
[report]
pdf = false
figures = false
tables = []
TOML

now() { date +%s.%N; }
t0=$(now)
"$fs" run -q -j "$JOBS" -o "$work/single.tar.gz" "$work/p/fitseal.toml" | sed -n 1p
t1=$(now)
seq 0 $((SHARDS - 1)) | xargs -P "$JOBS" -I{} "$fs" run -q -j 1 --shard "{}/$SHARDS" -o "$work/part-{}.tar.gz" "$work/p/fitseal.toml" >/dev/null
t2=$(now)
"$fs" merge -o "$work/merged.tar.gz" "$work"/part-*.tar.gz | sed -n 1,2p
t3=$(now)
if cmp -s "$work/single.tar.gz" "$work/merged.tar.gz"; then same=yes; else same=NO; fi
python3 - "$t0" "$t1" "$t2" "$t3" "$same" "$COUNT" "$SHARDS" "$JOBS" <<'PY'
import sys
t0, t1, t2, t3 = map(float, sys.argv[1:5])
same, count, shards, jobs = sys.argv[5], sys.argv[6], sys.argv[7], sys.argv[8]
single, parts, merge = t1 - t0, t2 - t1, t3 - t2
print(f"datasets {count}, shards {shards}, xargs -P {jobs}")
print(f"single run (-j {jobs}):        {single:8.1f} s")
print(f"{shards} shards by xargs -P {jobs}: {parts:8.1f} s")
print(f"merge:                       {merge:8.1f} s  ({100*merge/(parts+merge):.1f} % of shards + merge)")
print(f"merged bundle byte-identical to the single run: {same}")
PY
ls -l "$work"/single.tar.gz "$work"/merged.tar.gz | awk '{print $5, $9}'
[ "$same" = yes ]
