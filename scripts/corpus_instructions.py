#!/usr/bin/env python3
"""Instructions per balance for every entry of the published corpus, counted by callgrind.

    cargo bench --bench balance --no-run          # builds the benchmark binary
    python3 scripts/corpus_instructions.py BENCH_BINARY [TIMES]

BENCH_BINARY is the file `cargo bench --bench balance --no-run` names
(target/release/deps/balance-…). Each entry runs twice under `valgrind --tool=callgrind`, once
balanced TIMES times (default 2,000) through the binary's `--corpus-entry` mode and once zero
times; the difference divided by TIMES is the cost of one balance, text to result, without
start-up. Instruction counts do not move with the load on the machine, unlike wall times, so
they are the figures to compare between builds. Prints the median and slowest entries and
every non-unique one. Needs valgrind; takes about two minutes.
"""

import json
import re
import subprocess
import sys
from pathlib import Path

CORPUS = Path(__file__).resolve().parent.parent / "tests" / "data" / "balance_corpus.json"


def instructions(binary, entry, times):
    run = subprocess.run(
        [
            "valgrind",
            "--tool=callgrind",
            "--callgrind-out-file=/dev/null",
            binary,
            "--corpus-entry",
            entry,
            str(times),
        ],
        capture_output=True,
        text=True,
        check=True,
    )
    found = re.search(r"refs:\s+([\d,]+)", run.stderr)
    if found is None:
        sys.exit(f"no instruction count from valgrind for {entry}:\n{run.stderr}")
    return int(found.group(1).replace(",", ""))


def main():
    if len(sys.argv) < 2:
        sys.exit(__doc__)
    binary = sys.argv[1]
    times = int(sys.argv[2]) if len(sys.argv) > 2 else 2000
    entries = [entry["id"] for entry in json.loads(CORPUS.read_text())]
    per_balance = []
    for entry in entries:
        cost = instructions(binary, entry, times) - instructions(binary, entry, 0)
        per_balance.append((cost / times, entry))
    per_balance.sort()
    median = per_balance[len(per_balance) // 2]
    print(f"corpus of {len(per_balance)}: median {median[0]:,.0f} instructions ({median[1]})")
    print("slowest:")
    for cost, entry in per_balance[-5:]:
        print(f"  {entry}: {cost:,.0f}")
    print("non-unique:")
    for cost, entry in per_balance:
        if entry.startswith("nonunique"):
            print(f"  {entry}: {cost:,.0f}")


if __name__ == "__main__":
    main()
