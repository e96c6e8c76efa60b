#!/usr/bin/env python3
"""idp as the pool grows: for each size and graph, QUERIES port queries from
examples/generate_port_query.py, optimized with --tier=idp on 1, 2, 4 and
8 in-process workers (one thread each) at a fixed deadline, without cross
products. Prints per size, graph and pool: the median and largest plan
cost over the exact optimum (where the exact search finishes within
--exact-seconds; else over the best idp cost of any pool), and the median
largest block idp searched. Figures in docs/benchmarks.md.

On this project's 2-core machine, 4 and 8 workers share 2 cores: the
extra workers add slices, not speed, so the rows past 2 workers show what
over-subscription costs rather than what a larger pool buys.

    bench/idp_pool_bench.py [--sizes=30,45,60] [--graphs=tree,snowflake,cycles]
        [--queries=5] [--deadline=1] [--bin=build/cli/sliceplan]
"""
import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
POOLS = (1, 2, 4, 8)


def optimize(binary, path, tier, workers, deadline):
    cmd = [binary, "optimize", path, "--quiet", "--format=json", "--tier=" + tier,
           "--cross-products=false", "--workers=%d" % workers, "--threads-per-worker=1",
           "--deadline-seconds=%g" % deadline, "--partial-on-deadline=true"]
    run = subprocess.run(cmd, capture_output=True, text=True)
    if run.returncode != 0:
        return None
    doc = json.loads(run.stdout)
    idp = doc.get("stats", {}).get("idp", {})
    return (doc["plans"][0]["costs"]["cout"], doc.get("proven_optimal", False),
            idp.get("largest_block", 0))


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", default="30,45,60")
    parser.add_argument("--graphs", default="tree,snowflake,cycles")
    parser.add_argument("--queries", type=int, default=5)
    parser.add_argument("--deadline", type=float, default=1.0)
    parser.add_argument("--exact-seconds", type=float, default=20.0)
    parser.add_argument("--bin", default=os.path.join(ROOT, "build", "cli", "sliceplan"))
    args = parser.parse_args()
    print("| n | graph | workers | cost / reference: median | max | exact known | "
          "largest block (median) |")
    print("|---|---|---|---|---|---|---|")
    with tempfile.TemporaryDirectory() as tmp:
        for n in (int(s) for s in args.sizes.split(",")):
            for graph in args.graphs.split(","):
                costs = {w: [] for w in POOLS}
                blocks = {w: [] for w in POOLS}
                references, exact_known = [], 0
                for seed in range(1, args.queries + 1):
                    path = os.path.join(tmp, "q.json")
                    with open(path, "w") as f:
                        subprocess.run([sys.executable,
                                        os.path.join(ROOT, "examples", "generate_port_query.py"),
                                        str(n), "--graph=" + graph, "--seed=%d" % seed],
                                       check=True, stdout=f)
                    runs = {w: optimize(args.bin, path, "idp", w, args.deadline) for w in POOLS}
                    exact = optimize(args.bin, path, "exact", 2, args.exact_seconds)
                    if exact and exact[1]:
                        reference = exact[0]
                        exact_known += 1
                    else:
                        reference = min(r[0] for r in runs.values() if r)
                    references.append(reference)
                    for w in POOLS:
                        if runs[w]:
                            costs[w].append(runs[w][0] / reference)
                            blocks[w].append(runs[w][2])
                for w in POOLS:
                    if not costs[w]:
                        continue
                    print("| %d | %s | %d | %.3f | %.3f | %d of %d | %g |" % (
                        n, graph, w, statistics.median(costs[w]), max(costs[w]), exact_known,
                        len(references), statistics.median(blocks[w])))
                sys.stdout.flush()


if __name__ == "__main__":
    main()
