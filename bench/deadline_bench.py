#!/usr/bin/env python3
"""The heuristic tiers against their deadline on the largest queries the
limits take: random connected join graphs of 10,000 relations with 10,000
and 100,000 binary predicates (a spanning tree plus random edges, seeded),
each optimized by `--tier=greedy` and `--tier=auto` under deadlines of 0.5
and 1 s. Prints the process's wall time, the search's own time (the JSON's
`stats.wall_seconds`: from the deadline's start, after the file is read), its
peak resident memory (/usr/bin/time) and whether greedy was cut by the
deadline. Not a test; figures in docs/benchmarks.md.

    bench/deadline_bench.py [--bin=build/cli/sliceplan]
"""
import argparse
import json
import os
import random
import subprocess
import tempfile


def write_query(path, n, m, seed):
    rng = random.Random(seed)
    rows = [float(rng.choice([10, 100, 1e3, 1e4, 1e5, 1e6])) for _ in range(n)]
    edges = {(rng.randrange(i), i) for i in range(1, n)}
    while len(edges) < m:
        a, b = rng.randrange(n), rng.randrange(n)
        if a != b:
            edges.add((min(a, b), max(a, b)))
    query = {
        "relations": [{"name": f"t{i}", "rows": r} for i, r in enumerate(rows)],
        "predicates": [{"relations": [f"t{a}", f"t{b}"], "selectivity": 1 / max(rows[a], rows[b])}
                       for a, b in sorted(edges)],
    }
    with open(path, "w") as f:
        json.dump(query, f)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--bin", default="build/cli/sliceplan")
    args = parser.parse_args()
    print(f"{'predicates':>10} {'tier':>6} {'deadline':>8} {'process_s':>9} {'search_s':>8} "
          f"{'peak_MB':>7}  greedy")
    with tempfile.TemporaryDirectory() as tmp:
        for m in (10_000, 100_000):
            path = os.path.join(tmp, f"q{m}.json")
            write_query(path, 10_000, m, 1)
            for tier in ("greedy", "auto"):
                for deadline in (0.5, 1.0):
                    run = subprocess.run(
                        ["/usr/bin/time", "-f", "%e %M", args.bin, "optimize", path,
                         f"--tier={tier}", f"--deadline-seconds={deadline}", "--format=json",
                         "--quiet"], capture_output=True, text=True, check=True)
                    wall, rss_kb = run.stderr.strip().splitlines()[-1].split()
                    result = json.loads(run.stdout)
                    cut = "cut" if "greedy reached the deadline" in result["tier_reason"] else "whole"
                    print(f"{m:>10} {tier:>6} {deadline:>8} {float(wall):>9.2f} "
                          f"{result['stats']['wall_seconds']:>8.2f} {int(rss_kb) / 1024:>7.0f}  {cut}")


if __name__ == "__main__":
    main()
