#!/usr/bin/env bash
# End-to-end throughput of `standfit run` (a benchmark, not a test): generates COUNT well-behaved
# KP-250 units (21-point up/down straight-line sweeps, seeded) into a scratch inbox, runs the
# Release build once over them, and prints the tool's own units/s line.
# Usage: bench/throughput.sh [COUNT] [SEED]
set -euo pipefail
count=${1:-5000}
seed=${2:-1}
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

dotnet build "$repo/StandFit.sln" -c Release -v quiet -nologo >/dev/null
dotnet run --project "$repo/bench/StandFit.SweepGen" -c Release --no-build -- bulk "$work/inbox" "$count" "$seed" >/dev/null
cat > "$work/standfit.yaml" <<YAML
folders:
  inbox: inbox
  archive: archive
  rejected: rejected
  output: output
  recipes: "${RECIPES:-$repo/bench/recipes}"
  logs: logs
YAML
echo "machine: $(nproc) cores, $(awk '/MemTotal/ {printf "%.0f GiB", $2/1048576}' /proc/meminfo), $(dotnet --version) SDK"
echo "load: $(cut -d" " -f1-3 /proc/loadavg)"
/usr/bin/time -f "wall %e s, peak RSS %M KiB" dotnet "$repo/src/StandFit.Cli/bin/Release/net10.0/standfit.dll" run --config "$work/standfit.yaml" --quiet --stats
