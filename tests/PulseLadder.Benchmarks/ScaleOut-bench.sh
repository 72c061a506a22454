#!/usr/bin/env bash
# End-to-end throughput, upload to stored result, embedded (SQLite + in-memory queue, jobs in the web process) vs
# scaled (PostgreSQL data + queue, web host without jobs, W worker processes of one thread each).
# Usage: ScaleOut-bench.sh PULSELADDER_DLL ADMIN_CONNECTION_STRING [STARS] [MODES...]
#   MODES: embedded-1 embedded-2 scaled-1 scaled-2 (default: all four)
# Prints one line per mode: stars, seconds, stars/s; for scaled modes also Hangfire's mean job duration and
# latency (enqueue to start) from hangfire.state, and the per-job overhead = wall x threads / jobs - mean duration.
set -euo pipefail
DLL=$1; ADMIN=$2; STARS=${3:-150}; shift 3 || true
MODES=("$@"); [ ${#MODES[@]} -gt 0 ] || MODES=(embedded-1 embedded-2 scaled-1 scaled-2)
PY=/usr/bin/python3
WORK=$(mktemp -d /tmp/plx-scaleout-bench.XXXXXX)
PIDS=()
cleanup() { for p in "${PIDS[@]:-}"; do [ -n "$p" ] && kill -9 "$p" 2>/dev/null || true; done; rm -rf "$WORK"; }
trap cleanup EXIT
dotnet "$DLL" demo-data --out "$WORK/campaign" --stars "$STARS" >/dev/null
PHOT=("$WORK"/campaign/photometry-*.csv)
psql_admin() { $PY - "$ADMIN" "$1" <<'PYEOF'
import sys, subprocess
kv = dict(p.split('=', 1) for p in sys.argv[1].split(';') if '=' in p)
kv = {k.strip().lower(): v for k, v in kv.items()}
print(subprocess.run(['psql', '-h', kv.get('host', '127.0.0.1'), '-p', kv.get('port', '5432'), '-U', kv.get('username', 'postgres'),
  '-d', kv.get('database', 'postgres'), '-tAc', sys.argv[2]], check=True, capture_output=True, text=True).stdout.strip())
PYEOF
}
progress() { curl -fsS "$1/api/v1/progress" | $PY -c 'import json,sys; j=json.load(sys.stdin); print(j["stars_done"], j["stars_total"])'; }
now() { date +%s.%N; }

for mode in "${MODES[@]}"; do
  kind=${mode%-*}; w=${mode#*-}
  port=$((56000 + RANDOM % 2000)); url="http://127.0.0.1:$port"
  PIDS=()
  if [ "$kind" = embedded ]; then
    dotnet "$DLL" serve --urls "$url" --data-dir "$WORK/$mode" --workers "$w" >"$WORK/$mode-web.log" 2>&1 & PIDS+=($!)
  else
    db="plx_bench_$(date +%s%N | tail -c 9)"
    psql_admin "CREATE DATABASE $db" >/dev/null
    CS="${ADMIN/Database=postgres/Database=$db}"
    dotnet "$DLL" serve --urls "$url" --database "postgres:$CS" --jobs postgres --no-jobs >"$WORK/$mode-web.log" 2>&1 & PIDS+=($!)
  fi
  until curl -fsS "$url/health" >/dev/null 2>&1; do sleep 0.3; done
  if [ "$kind" = scaled ]; then
    for i in $(seq 1 "$w"); do dotnet "$DLL" work --database "postgres:$CS" --workers 1 >"$WORK/$mode-w$i.log" 2>&1 & PIDS+=($!); done
    sleep 8   # let the workers connect and start polling before the clock starts
  fi
  t0=$(now)
  dotnet "$DLL" upload --server "$url" --stars "$WORK/campaign/stars.csv" --time-scale jd_utc --time-offset 2450000 "${PHOT[@]}" >/dev/null
  t1=$(now)
  while :; do read -r done total < <(progress "$url"); [ "$done" -ge "$total" ] && [ "$total" -gt 0 ] && break; sleep 0.25; done
  t2=$(now)
  line=$($PY -c "print(f'$mode: {$total} stars, upload {$t1-$t0:.1f} s, upload-to-last-result {$t2-$t0:.1f} s, {$total/($t2-$t0):.2f} stars/s')")
  if [ "$kind" = scaled ]; then
    CSDB=$db
    read -r dur lat n < <(PGPASSWORD= psql -h 127.0.0.1 -p "$(echo "$ADMIN" | sed -n 's/.*Port=\([0-9]*\).*/\1/p')" -U postgres -d "$CSDB" -tAc \
      "SELECT round(avg((data::json->>'PerformanceDuration')::numeric)), round(avg((data::json->>'Latency')::numeric)), count(*) FROM hangfire.state WHERE name='Succeeded'" | tr '|' ' ')
    line="$line; jobs $n, mean duration $dur ms, mean latency $lat ms, overhead/job $($PY -c "print(f'{($t2-$t1)*1000*$w/$n-$dur:.0f}')") ms"
  fi
  echo "$line"
  for p in "${PIDS[@]}"; do kill -9 "$p" 2>/dev/null || true; done
  wait 2>/dev/null || true
done
