#!/usr/bin/env bash
# Runs one fuzz target for a while: ./run.sh TARGET SECONDS [WORK_DIR]
# New inputs go to WORK_DIR (default /tmp/shelfwind-fuzz/TARGET); the committed corpus
# in corpus/TARGET is read as seeds only. Limits: 1 s per input, 2 GB of memory.
set -euo pipefail
cd "$(dirname "$0")"
target=$1
seconds=$2
work=${3:-/tmp/shelfwind-fuzz/$target}
mkdir -p "$work"
case $target in
  grib2|land_file|any_file) dict=dict/binary.dict ;;
  coast_geojson|scenario) dict=dict/json.dict ;;
  tilepack) dict=dict/tilepack.dict ;;
  *) dict=dict/text.dict ;;
esac
RUSTC_BOOTSTRAP=1 cargo fuzz run -O "$target" "$work" "corpus/$target" -- \
  -max_total_time="$seconds" -timeout=1 -rss_limit_mb=2048 -max_len=65536 \
  -dict="$dict" -print_final_stats=1
