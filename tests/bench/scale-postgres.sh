#!/usr/bin/env bash
# Scale-out benchmark: one catalogue of N synthetic candidates (../shared/bench/gen-catalogue.py, about half false),
# screened import -> final states at 64 target bits on a fresh SQLite store (idq run, 2 threads), then on a fresh
# PostgreSQL database of a throw-away local cluster with 1, 2 and 4 `idq worker` processes of one thread each. Prints one
# Markdown table row per run: wall time, candidates per second, and verdicts that differ from the generator's truth.
# Usage, from the repository root: bash tests/bench/scale-postgres.sh [N=100000] [PORT=55499]
set -euo pipefail
n=${1:-100000}
port=${2:-55499}
root=$(cd "$(dirname "$0")/../.." && pwd)
gen=${GEN:-$root/../shared/bench/gen-catalogue.py}
dotnet build "$root/src/IdentityQueue.Cli" -c Release -v quiet -nologo >/dev/null
idq="dotnet $root/src/IdentityQueue.Cli/bin/Release/net10.0/idq.dll"
work=$(mktemp -d /tmp/idq-scale.XXXXXX)
pg=$(mktemp -d /tmp/idq-scale-pg.XXXXXX)   # its own folder: the server runs as another user when we are root
pids=()   # the worker processes this script started; cleanup stops these and no others
cleanup() { cd /; if [ "${#pids[@]}" -gt 0 ]; then kill -TERM "${pids[@]}" 2>/dev/null || true; wait "${pids[@]}" 2>/dev/null || true; fi; bash "$root/tests/postgres/pg-cluster.sh" stop "$pg" || true; rm -rf "$work" "$pg"; }
trap cleanup EXIT
admin=$(bash "$root/tests/postgres/pg-cluster.sh" start "$pg" "$port")
python3 "$gen" "$n" --seed 1 --truth "$work/truth.txt" > "$work/cat.idq"
cd "$work"

now() { date +%s.%N; }
report() { # store-kind workers seconds wrong
  python3 -c "import sys; n=$n; s=float('$3'); print(f'| $1 | $2 | {s:.1f} | {n/s:.0f} | $4 |')"
}
wrong_of() { # a file of "label<TAB>state" lines
  python3 - "$work/truth.txt" "$1" <<'PY'
import sys
truth = dict(l.split("\t") for l in open(sys.argv[1]).read().split("\n") if l)
got = dict(l.split("|", 1) for l in open(sys.argv[2]).read().split("\n") if l)
print(sum(1 for k, v in truth.items() if got.get(k, "").strip() != v.strip()))
PY
}

echo "| store | worker processes × threads | import → final state (s) | candidates/s | verdicts differing from truth |"
echo "| --- | --- | --- | --- | --- |"

$idq init --db sqlite.db >/dev/null
start=$(now)
$idq import cat.idq --db sqlite.db --seed 5 >/dev/null
$idq run --db sqlite.db --workers 2 >/dev/null
end=$(now)
$idq sql --db sqlite.db "select label || '|' || state from verdicts" --csv | tail -n +2 > verdicts-sqlite.txt
report "SQLite" "1 × 2 (idq run)" "$(python3 -c "print($end - $start)")" "$(wrong_of verdicts-sqlite.txt)"

for k in 1 2 4; do
  db="idq_scale_$k"
  psql "host=127.0.0.1 port=$port user=postgres dbname=postgres" -qc "CREATE DATABASE $db" >/dev/null
  conn="Host=127.0.0.1;Port=$port;Username=postgres;Database=$db"
  $idq init --postgres "$conn" >/dev/null
  start=$(now)
  $idq import cat.idq --postgres "$conn" --seed 5 >/dev/null
  pids=()
  for _ in $(seq "$k"); do $idq worker --postgres "$conn" --workers 1 >/dev/null 2>&1 & pids+=($!); done
  while :; do
    settled=$(psql "host=127.0.0.1 port=$port user=postgres dbname=$db" -tAc \
      "select count(*) from result where state in ('refuted','survived','undecided','invalid','failed')")
    [ "$settled" -ge "$n" ] && break
    sleep 0.2
  done
  end=$(now)
  kill -TERM "${pids[@]}"; wait "${pids[@]}" 2>/dev/null || true
  pids=()
  $idq sql --postgres "$conn" "select label || '|' || state from verdicts" --csv | tail -n +2 > "verdicts-pg-$k.txt"
  report "PostgreSQL" "$k × 1 (idq worker)" "$(python3 -c "print($end - $start)")" "$(wrong_of "verdicts-pg-$k.txt")"
done
