#!/usr/bin/env bash
# The whole PulseLadder test suite on a fresh Debian machine: installs what the tests need (PostgreSQL, Chromium and
# python3-astropy (+ python3-scipy for its false-alarm statistics, python3-pil to decode figures) from Debian's packages; uPlot from the npm registry through the build), starts a throw-away
# PostgreSQL on 127.0.0.1, reruns the reference-library comparisons, then runs every test project.
set -eo pipefail
set -u
cd "$(dirname "$0")/.."
ROOT=$(pwd)
export DOTNET_CLI_TELEMETRY_OPTOUT=1 DOTNET_NOLOGO=1 PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1

need=()
command -v chromium >/dev/null 2>&1 || need+=(chromium)
command -v npm >/dev/null 2>&1 || need+=(npm)
ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 || need+=(postgresql)
/usr/bin/python3 -c "import astropy, numpy, scipy" >/dev/null 2>&1 || need+=(python3-astropy python3-numpy python3-scipy)
/usr/bin/python3 -c "import PIL" >/dev/null 2>&1 || need+=(python3-pil)
if [ ${#need[@]} -gt 0 ]; then
  echo "== installing from Debian: ${need[*]}"
  SUDO=""; [ "$(id -u)" = 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
fi

echo "== starting PostgreSQL on 127.0.0.1:55432"
PGBIN=$(ls -d /usr/lib/postgresql/*/bin | sort -V | tail -1)
PGDATA=$(mktemp -d /tmp/pulseladder-pg.XXXXXX)
as_pg() { if [ "$(id -u)" = 0 ]; then su postgres -s /bin/sh -c "$1"; else sh -c "$1"; fi; }
[ "$(id -u)" = 0 ] && chown postgres "$PGDATA"
as_pg "'$PGBIN/initdb' -D '$PGDATA' -A trust -U postgres >/dev/null"
as_pg "'$PGBIN/pg_ctl' -D '$PGDATA' -o '-p 55432 -k /tmp -c listen_addresses=127.0.0.1 -c max_connections=200 -c fsync=off' -l '$PGDATA/server.log' -w start >/dev/null"
stop_pg() { as_pg "'$PGBIN/pg_ctl' -D '$PGDATA' -m fast stop >/dev/null" || true; rm -rf "$PGDATA"; }
trap stop_pg EXIT
"$PGBIN/psql" -h 127.0.0.1 -p 55432 -U postgres -q -c "CREATE DATABASE pulseladder_test" >/dev/null
export PULSELADDER_TEST_POSTGRES="Host=127.0.0.1;Port=55432;Username=postgres;Database=pulseladder_test;Pooling=true;Maximum Pool Size=50"
export PULSELADDER_PGBIN="$PGBIN" PULSELADDER_PGDATA="$PGDATA"
export PULSELADDER_CHROMIUM=$(command -v chromium)

echo "== reference-library comparisons (astropy $(/usr/bin/python3 -c 'import astropy; print(astropy.__version__)'))"
for v in tests/reference/*/verify.sh; do
  [ -f "$v" ] || continue
  echo "-- $v"; bash "$v"
done

echo "== build"
dotnet build PulseLadder.sln -c Release -nologo -v q -clp:ErrorsOnly

failed=0
summary=$(mktemp)
for p in Kernels Core Storage Web Browser ScaleOut; do
  proj="tests/PulseLadder.$p.Tests"
  [ -d "$proj" ] || continue
  echo "== tests: $proj"
  if ! dotnet test "$proj" -c Release --no-build -nologo --logger "console;verbosity=minimal" --results-directory "$ROOT/TestResults/$p" | tee -a "$summary"; then
    failed=1
  fi
done
# One closing line over every project: "N passed, N failed".
passed=$(grep -oE 'Passed: +[0-9]+' "$summary" | awk '{s+=$2} END {print s+0}')
nfailed=$(grep -oE 'Failed: +[0-9]+' "$summary" | awk '{s+=$2} END {print s+0}')
rm -f "$summary"
echo "$passed passed, $nfailed failed"
[ "$nfailed" = 0 ] || failed=1
exit $failed
