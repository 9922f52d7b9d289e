#!/usr/bin/env bash
# Size and Chromium render time of the morning report for a big day (a benchmark, not a test):
# makes the report of 10,000 generated units (tests/.../Reporting/LargeReportTests, which asserts
# the 5 MB ceiling and keeps the page through STANDFIT_REPORT_BENCH_FILE), then loads it RUNS times
# in headless Chromium: the time from navigation start to the page's load event (measured by a
# harness page around it, in an iframe of 1280 x 1600), and the wall time of a screenshot against
# that of an empty page. Needs Debian's chromium (apt-get install -y chromium).
# Usage: bench/report.sh [RUNS]
set -euo pipefail
runs=${1:-5}
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
browser=$(command -v chromium || command -v chromium-browser || command -v google-chrome || true)
if [ -z "$browser" ]; then
  echo "bench/report.sh: no chromium on PATH (apt-get install -y chromium)" >&2
  exit 1
fi

dotnet build "$repo/StandFit.sln" -c Release -v quiet -nologo >/dev/null
STANDFIT_REPORT_BENCH_FILE="$work/report.html" dotnet test "$repo/tests/StandFit.Tests" -c Release --no-build \
  --filter "FullyQualifiedName~LargeReportTests" --nologo -v quiet >/dev/null
bytes=$(stat -c %s "$work/report.html")
echo "machine: $(nproc) cores, $(awk '/MemTotal/ {printf "%.0f GiB", $2/1048576}' /proc/meminfo), $("$browser" --version 2>/dev/null)"
echo "report of 10000 units: $bytes bytes ($(awk -v b="$bytes" 'BEGIN {printf "%.2f", b / 1048576}') MiB; ceiling 5 MiB)"

cat > "$work/harness.html" <<'HTML'
<!DOCTYPE html><html><body><script>var t0 = performance.now();</script>
<iframe style="width:1280px;height:1600px" src="report.html"
  onload="document.body.setAttribute('data-ms', (performance.now() - t0).toFixed(0));"></iframe></body></html>
HTML
echo '<!DOCTYPE html><html><body><p>empty</p></body></html>' > "$work/empty.html"
flags=(--headless --no-sandbox --disable-gpu --disable-dev-shm-usage --no-first-run --hide-scrollbars "--user-data-dir=$work/profile")
for i in $(seq "$runs"); do
  ms=$("$browser" "${flags[@]}" --dump-dom "file://$work/harness.html" 2>/dev/null | grep -o 'data-ms="[0-9]*"' | grep -o '[0-9]*')
  echo "run $i: load event after ${ms} ms"
done
for page in empty report; do
  start=$(date +%s.%N)
  "$browser" "${flags[@]}" --window-size=1280,1600 "--screenshot=$work/$page.png" "file://$work/$page.html" >/dev/null 2>&1
  end=$(date +%s.%N)
  echo "screenshot of $page.html: $(awk -v s="$start" -v e="$end" 'BEGIN {printf "%.2f", e - s}') s wall (browser start included)"
done
