#!/usr/bin/env bash
# A new version of a catalogue (#15 point 5): N synthetic candidates from ../shared/bench/gen-catalogue.py are imported and
# run; then every tenth line is edited (" + 0" appended to its right side: another canonical identity, the same truth) and
# the file is imported again with --new-version and run. Prints the import, re-import and both runs' times and how many
# candidates the second run screened. Usage, from the repository root: bash tests/bench/new-version.sh [N=20000] [WORKERS=2]
set -euo pipefail
n=${1:-20000}
workers=${2:-2}
root=$(cd "$(dirname "$0")/../.." && pwd)
gen=${GEN:-$root/../shared/bench/gen-catalogue.py}
dotnet build "$root/src/IdentityQueue.Cli" -c Release -v quiet -nologo >/dev/null
idq="dotnet $root/src/IdentityQueue.Cli/bin/Release/net10.0/idq.dll"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
python3 "$gen" "$n" --seed 1 > "$work/cat.idq"
$idq init --db "$work/b.db" >/dev/null
t() { local s e; s=$(date +%s.%N); "$@" >/dev/null; e=$(date +%s.%N); python3 -c "print(f'{$e - $s:.1f}')"; }
import=$(t $idq import "$work/cat.idq" --db "$work/b.db" --seed 5)
run1=$(t $idq run --db "$work/b.db" --workers "$workers" --summary "$work/run1.json")
awk 'NR % 10 == 0 && /=/ && !/^#/ && !/ for / && !/ over / { $0 = $0 " + 0" } { print }' "$work/cat.idq" > "$work/cat2.idq"
mv "$work/cat2.idq" "$work/cat.idq"
reimport=$(t $idq import "$work/cat.idq" --db "$work/b.db" --new-version)
run2=$(t $idq run --db "$work/b.db" --workers "$workers" --summary "$work/run2.json")
python3 - "$work" "$n" "$import" "$run1" "$reimport" "$run2" <<'PY'
import json, sys
work, n = sys.argv[1], int(sys.argv[2])
imp, run1, reimp, run2 = map(float, sys.argv[3:7])
s1 = json.load(open(f"{work}/run1.json"))["settledThisRun"]
s2 = json.load(open(f"{work}/run2.json"))["settledThisRun"]
print(f"{n} candidates: import {imp} s, run {run1} s ({s1} screened); "
      f"new version with every tenth line edited: re-import {reimp} s, run {run2} s ({s2} screened)")
PY
