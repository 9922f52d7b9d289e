#!/usr/bin/env bash
# End-to-end throughput of `standfit run` (a benchmark, not a test). Prints everything
# docs/performance.md records, in one run:
#   - the machine (cores, memory, SDK, load before and after);
#   - the standard workload: COUNT seeded KP-250 units (21-point up/down straight-line sweeps),
#     recipe bench/recipes/kp-250-standard.yaml (analytic + delete-one jackknife + pairs bootstrap
#     1000, default diagnostics), Parquet and log written: units/s, the tool's --stats lines
#     (time per stage, CPU, GC, peak working set) and peak RSS;
#   - a read-and-move-only baseline over the same files in the same run (every file read, then
#     moved to another folder, with few processes) and the tool's share of it;
#   - start-up time of a one-shot run on an empty inbox;
#   - with --sweeps: units 10k and 100k (1M with --million) and resamples 0/250/1000/2000.
# Usage: bench/throughput.sh [--sweeps] [--million] [COUNT] [SEED]    (COUNT 5000, SEED 1)
set -euo pipefail
sweeps=0; million=0; args=()
for a in "$@"; do
  case "$a" in
    --sweeps) sweeps=1 ;;
    --million) million=1 ;;
    *) args+=("$a") ;;
  esac
done
count=${args[0]:-5000}
seed=${args[1]:-1}
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
dll="$repo/src/StandFit.Cli/bin/Release/net10.0/standfit.dll"

dotnet build "$repo/StandFit.sln" -c Release -v quiet -nologo >/dev/null

# recipes_with RESAMPLES: a recipe folder holding only the bench recipe with that bootstrap count.
recipes_with() {
  local dir="$work/recipes-$1"
  mkdir -p "$dir"
  if [ "$1" = 0 ]; then
    sed -e '/^resampling:/,$d' "$repo/bench/recipes/kp-250-standard.yaml" > "$dir/kp-250.yaml"
  else
    sed -e "s/^  resamples: .*/  resamples: $1/" "$repo/bench/recipes/kp-250-standard.yaml" > "$dir/kp-250.yaml"
  fi
  echo "$dir"
}

# measure NAME COUNT RESAMPLES: generates COUNT units, runs the read-and-move baseline over a copy,
# then `standfit run --stats` over the originals; prints one summary line.
measure() {
  local name=$1 n=$2 resamples=$3 dir="$work/$1"
  mkdir -p "$dir"
  dotnet run --project "$repo/bench/StandFit.SweepGen" -c Release --no-build -- bulk "$dir/inbox" "$n" "$seed" >/dev/null
  cat > "$dir/standfit.yaml" <<YAML
folders:
  inbox: inbox
  archive: archive
  rejected: rejected
  output: output
  recipes: "$(recipes_with "$resamples")"
  logs: logs
YAML
  # Baseline: read every file and move it, over a copy made outside the timing.
  cp -r "$dir/inbox" "$dir/base-in"; mkdir -p "$dir/base-out"; sync
  local t0 t1 base
  t0=$(date +%s.%N)
  find "$dir/base-in" -type f -print0 | xargs -0 cat > /dev/null
  find "$dir/base-in" -type f -print0 | xargs -0 mv -t "$dir/base-out"
  t1=$(date +%s.%N)
  base=$(awk -v a="$t0" -v b="$t1" -v n="$n" 'BEGIN { printf "%.0f", n / (b - a) }')
  rm -rf "$dir/base-in" "$dir/base-out"
  (cd "$dir" && /usr/bin/time -f "time: wall %e s, peak RSS %M KiB" dotnet "$dll" run --config standfit.yaml --quiet --stats) 2> "$dir/stats.txt"
  sed "s/^/  [$name] /" "$dir/stats.txt"
  local rate rss
  rate=$(grep -o '[0-9]* units/s' "$dir/stats.txt" | tail -1 | cut -d' ' -f1)
  rss=$(grep -o 'peak RSS [0-9]*' "$dir/stats.txt" | awk '{printf "%.0f", $3/1024}')
  awk -v name="$name" -v n="$n" -v r="$resamples" -v rate="$rate" -v base="$base" -v rss="$rss" \
    'BEGIN { printf "RESULT %-10s units %8d  resamples %4d  %6d units/s  baseline %7d units/s  share %5.1f %%  peak RSS %4d MiB\n", name, n, r, rate, base, 100 * rate / base, rss }'
  rm -rf "$dir"
}

echo "machine: $(nproc) cores, $(awk '/MemTotal/ {printf "%.0f GiB", $2/1048576}' /proc/meminfo), .NET SDK $(dotnet --version), load $(cut -d' ' -f1-3 /proc/loadavg)"
echo "workload: bench/recipes/kp-250-standard.yaml (analytic + delete-one jackknife + pairs bootstrap), seed $seed"

measure standard "$count" 1000

# Start-up: a one-shot run on an empty inbox.
mkdir -p "$work/empty/inbox"
cat > "$work/empty/standfit.yaml" <<YAML
folders:
  inbox: inbox
  archive: archive
  rejected: rejected
  output: output
  recipes: "$(recipes_with 1000)"
  logs: logs
YAML
for i in 1 2 3; do
  (cd "$work/empty" && /usr/bin/time -f "start-up on an empty inbox (run $i): wall %e s, peak RSS %M KiB" dotnet "$dll" run --config standfit.yaml --quiet) 2>&1 | tail -1
done

if [ "$sweeps" = 1 ]; then
  for n in 10000 100000; do measure "units-$n" "$n" 1000; done
  if [ "$million" = 1 ]; then measure units-1000000 1000000 1000; fi
  for r in 0 250 1000 2000; do measure "resamp-$r" "$count" "$r"; done
fi
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg)"
