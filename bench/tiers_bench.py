#!/usr/bin/env python3
"""The tiers on very large joins: for each size and graph, QUERIES queries
from examples/generate_port_query.py, each optimized by greedy, linear (up
to 1,000 relations) and auto, one in-process worker, the default 10 s
budget. Prints per size and graph: auto's median and largest optimization
time (the `wall_seconds` of its JSON, file reading excluded), and its plan
cost over the best of greedy and linear (median, largest, and how many
queries auto improved). Figures in docs/benchmarks.md.

    bench/tiers_bench.py [--sizes=100,1000,5000] [--queries=20] [--bin=build/cli/sliceplan]
                         [--cross-products=true|false]
"""
import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def optimize(binary, path, tier, cross_products):
    out = subprocess.run([binary, "optimize", path, "--quiet", "--workers=1", "--format=json",
                          "--tier=" + tier, "--cross-products=" + cross_products],
                         check=True, capture_output=True, text=True).stdout
    doc = json.loads(out)
    return doc["plans"][0]["costs"]["cout"], doc["stats"]["wall_seconds"], doc["tier"]


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", default="100,1000,5000")
    parser.add_argument("--graphs", default="tree,snowflake,cycles")
    parser.add_argument("--queries", type=int, default=20)
    parser.add_argument("--bin", default=os.path.join(ROOT, "build", "cli", "sliceplan"))
    parser.add_argument("--cross-products", default="true", choices=["true", "false"])
    args = parser.parse_args()
    print("| n | graph | queries | auto median s | auto max s | greedy median s | "
          "cost / best(greedy, linear): median | max | improved | tiers |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    with tempfile.TemporaryDirectory() as tmp:
        for n in (int(s) for s in args.sizes.split(",")):
            for graph in args.graphs.split(","):
                times, greedy_times, ratios, tiers = [], [], [], {}
                for seed in range(1, args.queries + 1):
                    path = os.path.join(tmp, "q.json")
                    with open(path, "w") as f:
                        subprocess.run([sys.executable,
                                        os.path.join(ROOT, "examples", "generate_port_query.py"),
                                        str(n), "--graph=" + graph, "--seed=%d" % seed],
                                       check=True, stdout=f)
                    greedy, greedy_s, _ = optimize(args.bin, path, "greedy", args.cross_products)
                    best = greedy
                    if n <= 1000:
                        best = min(best, optimize(args.bin, path, "linear", args.cross_products)[0])
                    cost, seconds, tier = optimize(args.bin, path, "auto", args.cross_products)
                    times.append(seconds)
                    greedy_times.append(greedy_s)
                    ratios.append(cost / best)
                    tiers[tier] = tiers.get(tier, 0) + 1
                print("| %d | %s | %d | %.3f | %.3f | %.3f | %.3f | %.3f | %d | %s |" % (
                    n, graph, len(times), statistics.median(times), max(times),
                    statistics.median(greedy_times), statistics.median(ratios), max(ratios),
                    sum(r < 1 - 1e-12 for r in ratios),
                    ", ".join("%s %d" % kv for kv in sorted(tiers.items()))), flush=True)


if __name__ == "__main__":
    main()
