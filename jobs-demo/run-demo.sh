#!/usr/bin/env bash
# Generates the invented demo campaign, uploads it to a running PulseLadder server and waits for the analysis.
#
#   jobs-demo/run-demo.sh [SERVER_URL] [OUT_DIR]
#
# SERVER_URL defaults to $PULSELADDER_SERVER or http://localhost:5000; OUT_DIR to a fresh temporary directory.
# Set PULSELADDER to an installed `pulseladder` executable to skip `dotnet run`. Extra generator options
# (e.g. --seed 7) can be passed through DEMO_ARGS.
# The photometry times are JD(UTC) - 2450000, hence --time-scale jd_utc --time-offset 2450000.
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
server="${1:-${PULSELADDER_SERVER:-http://localhost:5000}}"
out="${2:-$(mktemp -d -t pulseladder-demo.XXXXXX)}"

if [[ -n "${PULSELADDER:-}" ]]; then
  pl=("$PULSELADDER")
else
  pl=(dotnet run --project "$repo/src/PulseLadder.Cli" --)
fi

echo "== generating the demo campaign into $out"
# shellcheck disable=SC2086
"${pl[@]}" demo-data --out "$out" ${DEMO_ARGS:-}

shopt -s nullglob
photometry=("$out"/photometry-*.csv)
if [[ ${#photometry[@]} -eq 0 ]]; then
  echo "no photometry files were generated in $out" >&2
  exit 1
fi

echo "== uploading ${#photometry[@]} photometry files and the star list to $server"
"${pl[@]}" upload --server "$server" --stars "$out/stars.csv" \
  --time-scale jd_utc --time-offset 2450000 "${photometry[@]}"

echo "== waiting for the analysis"
"${pl[@]}" status --server "$server" --wait

echo "== done; the true parameters are in $out/truth.csv"
