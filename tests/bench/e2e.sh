#!/usr/bin/env bash
# End-to-end benchmark: N synthetic candidates (about half false) from ../shared/bench/gen-catalogue.py, imported into a
# fresh SQLite store and run to final states at 64 target bits. Prints candidates per second (import to final state)
# and the peak resident memory of each step. Usage, from the repository root: bash tests/bench/e2e.sh [N=100000] [WORKERS=2]
set -euo pipefail
n=${1:-100000}
workers=${2:-2}
root=$(cd "$(dirname "$0")/../.." && pwd)
gen=${GEN:-$root/../shared/bench/gen-catalogue.py}
dotnet build "$root/src/IdentityQueue.Cli" -c Release -v quiet -nologo >/dev/null
idq="dotnet $root/src/IdentityQueue.Cli/bin/Release/net10.0/idq.dll"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
python3 "$gen" "$n" --seed 1 --truth "$work/truth.txt" > "$work/cat.idq"
$idq init --db "$work/b.db" >/dev/null
start=$(date +%s.%N)
/usr/bin/time -f "%M" -o "$work/import.mem" $idq import "$work/cat.idq" --db "$work/b.db" --seed 5 >/dev/null
/usr/bin/time -f "%M" -o "$work/run.mem" $idq run --db "$work/b.db" --workers "$workers" >/dev/null
end=$(date +%s.%N)
python3 - "$work" "$n" "$start" "$end" <<'PY'
import sqlite3, sys
work, n, start, end = sys.argv[1], int(sys.argv[2]), float(sys.argv[3]), float(sys.argv[4])
db = sqlite3.connect(f"{work}/b.db")
truth = dict(line.split("\t") for line in open(f"{work}/truth.txt").read().split("\n") if line)
got = dict(db.execute("select label, state from verdicts"))
wrong = sum(1 for k, v in truth.items() if got.get(k) != v.strip())
false = sum(1 for v in truth.values() if v.strip() == "refuted")
first = db.execute("select count(*) from result r join trial t on t.id = r.witness_trial_id where r.state = 'refuted' and t.seq = 1").fetchone()[0]
# the first stage: the trials on the candidate's cheapest rung (over Q, one block of independent trials)
stage = db.execute("""select count(*) from result r join trial t on t.id = r.witness_trial_id
                      where r.state = 'refuted' and t.field_bits = (select min(u.field_bits) from trial u where u.candidate_id = r.candidate_id)""").fetchone()[0]
mem = [int(open(f"{work}/{s}.mem").read().split()[-1]) for s in ("import", "run")]
seconds = end - start
print(f"{n} candidates, import to final state in {seconds:.1f} s: {n / seconds:.0f} candidates/s; "
      f"peak memory import {mem[0] / 1024:.0f} MiB, run {mem[1] / 1024:.0f} MiB; "
      f"{wrong} verdicts differ from the generator's truth; of {false} false ones {stage} refuted in the first stage, {first} by their first trial")
PY
