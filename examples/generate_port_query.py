#!/usr/bin/env python3
"""Writes a large query in the house scenario: the data warehouse of a
fictional freight and port-logistics group, one relation per table of its
many terminals, joined along their keys.

    examples/generate_port_query.py N [--graph=snowflake|tree|cycles|random|clique]
        [--seed=S] > query.json

Every relation is a table of one terminal ("berths_t12", "crane_moves_t3");
rows are drawn log-uniformly per table kind. Graphs:

  snowflake  a fact table of container moves; each table is referenced by
             one larger table, most often one near the fact (default)
  tree       each table is referenced by one larger table at random
  cycles     a tree plus n/10 extra joins closing cycles
  random     a tree plus n/2 extra joins
  clique     every pair joined (selectivities drawn in [0.01, 0.5]): the
             worst case for the exact search

A quarter of the tables are filtered (1% to 100% of their rows kept); a join is
a foreign key into the smaller table's key, selectivity 1 / its key count,
so a join's result is the larger side cut by the smaller side's filter:
results stay near the base tables' sizes however many tables join, and
joining the filtered tables early pays, as in real warehouses. The
output is deterministic for (N, graph, seed). Invented data, for the demo.
"""
import argparse
import json
import math
import random
import sys

KINDS = [
    # (table kind, least rows, most rows, row bytes)
    ("container_moves", 1e8, 5e8, 120),
    ("shipments", 1e7, 2e8, 180),
    ("containers", 1e6, 2e7, 96),
    ("voyages", 1e5, 5e5, 120),
    ("yard_slots", 1e5, 1e6, 48),
    ("crane_moves", 1e6, 5e7, 64),
    ("customs_filings", 1e5, 5e6, 150),
    ("gate_events", 1e6, 3e7, 80),
    ("invoices", 1e5, 5e6, 110),
    ("bills_of_lading", 1e5, 5e6, 200),
    ("reefer_readings", 1e6, 1e8, 40),
    ("truck_visits", 1e5, 2e6, 90),
    ("rail_cars", 1e3, 1e5, 70),
    ("vessels", 1e3, 1e4, 210),
    ("berths", 20, 200, 60),
    ("cranes", 20, 300, 60),
    ("pilots", 50, 500, 80),
    ("tugs", 10, 100, 60),
    ("carriers", 100, 1000, 100),
    ("customers", 1e4, 1e5, 160),
    ("commodities", 1e3, 1e4, 90),
    ("tariffs", 1e3, 2e4, 70),
    ("ports", 500, 5000, 90),
    ("countries", 200, 250, 50),
    ("container_types", 20, 60, 40),
]


def relation(i, kind, rng, scale=1.0):
    """A table: its key count (base rows) and the rows left after the
    query's filters on it (a quarter of the tables filtered, keeping 1% to
    100%, log-uniform)."""
    name, lo, hi, width = kind
    base = max(2.0, math.exp(rng.uniform(math.log(lo), math.log(hi))) * scale)
    kept = 1.0 if rng.random() < 0.75 else math.exp(rng.uniform(math.log(1e-2), 0.0))
    return {"name": "%s_t%d" % (name, i), "rows": float("%.4g" % max(base * kept, 1.0)),
            "row_bytes": width, "base": base}


def key_join(relations, a, b):
    """A foreign key into the smaller table's key: each row of the larger
    side meets one key of 1 / (the smaller table's key count)."""
    keys = min(relations[a]["base"], relations[b]["base"])
    return {"relations": [relations[a]["name"], relations[b]["name"]],
            "selectivity": float("%.4g" % (1.0 / keys))}


def tables(n, rng):
    """n tables, the largest first (the first is always a fact table of
    container moves), renumbered in that order."""
    drawn = [relation(0, KINDS[0], rng)] + [relation(0, rng.choice(KINDS[1:]), rng)
                                          for _ in range(n - 1)]
    drawn[1:] = sorted(drawn[1:], key=lambda r: -r["base"])
    for i, r in enumerate(drawn):
        r["name"] = "%s_t%d" % (r["name"].rsplit("_t", 1)[0], i)
    return drawn


def snowflake(n, rng):
    """Each table is referenced by one larger one, most often one near the
    fact table: a few hubs with many dimensions, then deeper levels."""
    relations = tables(n, rng)
    return relations, [(int(i * rng.random() ** 2), i) for i in range(1, n)]


def tree(n, rng):
    """Each table is referenced by one larger table chosen uniformly."""
    relations = tables(n, rng)
    return relations, [(rng.randrange(i), i) for i in range(1, n)]


def with_extra(n, rng, extra):
    relations, edges = tree(n, rng)
    seen = set(edges)
    while extra > 0 and n > 2:
        a, b = sorted(rng.sample(range(n), 2))
        if (a, b) in seen:
            continue
        seen.add((a, b))
        edges.append((a, b))
        extra -= 1
    return relations, edges


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("n", type=int, help="relations (2 to 10,000)")
    parser.add_argument("--graph", default="snowflake",
                        choices=["snowflake", "tree", "cycles", "random", "clique"])
    parser.add_argument("--seed", type=int, default=1)
    args = parser.parse_args()
    if not 2 <= args.n <= 10000:
        parser.error("n: must lie in 2..10000, got %d" % args.n)
    if args.graph == "clique" and args.n > 200:
        parser.error("n: a clique of %d has %d predicates; at most 200 relations"
                     % (args.n, args.n * (args.n - 1) // 2))
    rng = random.Random(args.seed * 1000003 + args.n)
    predicates = []
    if args.graph == "snowflake":
        relations, edges = snowflake(args.n, rng)
    elif args.graph == "tree":
        relations, edges = tree(args.n, rng)
    elif args.graph == "cycles":
        relations, edges = with_extra(args.n, rng, max(1, args.n // 10))
    elif args.graph == "random":
        relations, edges = with_extra(args.n, rng, args.n // 2)
    else:
        relations = tables(args.n, rng)
        edges = []
        for a in range(args.n):
            for b in range(a + 1, args.n):
                predicates.append({"relations": [relations[a]["name"], relations[b]["name"]],
                                   "selectivity": float("%.4g" % rng.uniform(0.01, 0.5))})
    predicates += [key_join(relations, a, b) for a, b in edges]
    for r in relations:
        del r["base"]
    json.dump({"relations": relations, "predicates": predicates}, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
