#!/usr/bin/env bash
# The speed figures of the README's "Speed and memory", side by side in one run, whole process
# (wall time and peak resident set by /usr/bin/time), release build:
#   one appraisal from a 1,000,000-listing CSV, from the same market as partitioned Parquet,
#   from a 10,000,000-listing partitioned market (and 100,000,000 with LAKE_100M=1, which
#   writes about 2.8 GB), and a batch of 10,000 subjects across the demo's models on the CSV.
# Usage: bash tests/speed/side-by-side.sh [WORK_DIR]   (default /tmp/comptrail-speed)
set -euo pipefail
cd "$(dirname "$0")/../.."
export CARGO_TARGET_DIR="${CARGO_TARGET_DIR:-$HOME/.cache/comptrail-target}"
cargo build --release -q -p cli
bin="$CARGO_TARGET_DIR/release/comptrail"
work="${1:-/tmp/comptrail-speed}"
mkdir -p "$work"
cd "$work"
runs="${RUNS:-3}"

[ -f m1m.csv ] || "$bin" demo-market --rows 1000000 --seed 3 --out m1m.csv
[ -d lake1m ] || "$bin" convert m1m.csv --out lake1m > /dev/null
[ -d lake10m ] || "$bin" demo-market --rows 10000000 --seed 3 --parquet --out lake10m
if [ "${LAKE_100M:-0}" = 1 ] && [ ! -d lake100m ]; then
  "$bin" demo-market --rows 100000000 --seed 3 --parquet --out lake100m
fi
# Every hundredth listing of the CSV as a subject: 10,000 across the three models.
[ -f subjects10k.csv ] || awk -F, 'NR == 1 { print "id,model_year,make,model,variant,miles,condition,options"; next }
  NR % 100 == 2 { printf "S%05d,%s,%s,%s,%s,%s,%s,%s\n", n++, $1, $2, $3, $4, $6, $7, $16 }' m1m.csv > subjects10k.csv

tessel="year=2022,make=Quellmark,model=Tessel,variant=Ambrel,miles=41000,condition=used"
kestrel="year=2022,make=Orvane,model=Kestrel,variant=Halvet,miles=41000,condition=used"
measure() {
  local times="$1" label="$2"; shift 2
  for _ in $(seq "$times"); do
    /usr/bin/time -f "%e %M" -o time.txt "$@" > /dev/null 2> err.txt || { cat err.txt; exit 1; }
    read -r secs kb < time.txt
    printf '%-58s %7.2f s %8.0f MB\n' "$label" "$secs" "$((kb / 1024))"
  done
}
echo "== $(date -u +%F) on $(nproc) cores"
measure "$runs" "appraise, 1M CSV (Tessel: 500k in its segment)" "$bin" appraise m1m.csv --subject "$tessel"
measure "$runs" "appraise, 1M as Parquet (Tessel)" "$bin" appraise lake1m --subject "$tessel"
measure "$runs" "appraise, 1M as Parquet (Kestrel: 200k)" "$bin" appraise lake1m --subject "$kestrel"
measure "$runs" "appraise, 10M as Parquet (Kestrel: 2M)" "$bin" appraise lake10m --subject "$kestrel"
if [ -d lake100m ]; then
  measure 1 "appraise, 100M as Parquet (Kestrel: 20M)" "$bin" appraise lake100m --subject "$kestrel"
fi
measure 1 "batch, 10,000 subjects on the 1M CSV" "$bin" batch m1m.csv --subjects subjects10k.csv --out values.csv
