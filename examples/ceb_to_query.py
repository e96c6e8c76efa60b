#!/usr/bin/env python3
"""Turns a join graph with true cardinalities (the format of
tests/data/ceb-imdb/README.md: graphs of the CEB-IMDb workload as published
with the DPconv paper, Stoian and Kipf 2024, MIT) into a sliceplan query
file: relations at their true rows, one predicate per edge at the
independence model's selectivity rows({a,b}) / (rows(a) rows(b)), and,
unless --model-only, every connected set listed in `cardinalities` at its
true rows.

    examples/ceb_to_query.py GRAPH.csv [--model-only] > QUERY.json
"""
import argparse
import json
import sys


def read_graph(path):
    with open(path) as f:
        tokens = f.read().split()
    n, m, k = int(tokens[0]), int(tokens[1]), int(tokens[2])
    aliases = tokens[3:3 + n]
    pos = 3 + n
    edges = sorted({tuple(sorted((int(tokens[pos + 2 * e]), int(tokens[pos + 2 * e + 1]))))
                    for e in range(m)})
    pos += 2 * m
    rows = {}
    for i in range(k):
        rows[int(tokens[pos + 2 * i])] = float(tokens[pos + 2 * i + 1])
    return aliases, edges, rows


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("graph")
    parser.add_argument("--model-only", action="store_true",
                        help="no cardinalities: the independence model's estimates only")
    args = parser.parse_args()
    aliases, edges, rows = read_graph(args.graph)
    query = {
        "relations": [{"name": a, "rows": rows[1 << i]} for i, a in enumerate(aliases)],
        "predicates": [{
            "relations": [aliases[a], aliases[b]],
            "selectivity": min(1.0, rows[(1 << a) | (1 << b)] / (rows[1 << a] * rows[1 << b])),
        } for a, b in edges],
    }
    if not args.model_only:
        query["cardinalities"] = [{
            "relations": [aliases[i] for i in range(len(aliases)) if mask >> i & 1],
            "rows": r,
        } for mask, r in sorted(rows.items())]
    json.dump(query, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
