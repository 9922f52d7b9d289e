#!/usr/bin/env bash
# Soak bench (not run in CI): COUNT files (default 100,000) through one `standfit watch` process,
# peak working set and memory growth reported. Usage: bench/soak.sh [COUNT]
set -euo pipefail
count=${1:-100000}
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
dotnet build "$repo/src/StandFit.Cli" -c Release -v quiet -nologo >/dev/null
dotnet build "$repo/bench/StandFit.Soak" -c Release -v quiet -nologo >/dev/null
dotnet "$repo/bench/StandFit.Soak/bin/Release/net10.0/StandFit.Soak.dll" \
  "$repo/src/StandFit.Cli/bin/Release/net10.0/standfit.dll" "$repo" "$count" "$work"
