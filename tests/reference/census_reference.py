#!/usr/bin/python3
"""Reference auxiliary statistics of directed graphs from networkx (Debian python3-networkx).

Reads {"graphs": [{"n": int, "edges": [[i, j], ...]}, ...]} on stdin and writes
{"results": [{"triads": {label: count}, "mutual", "asymmetric", "null", "reciprocity" (null without ties),
              "distances": {d: count of ordered pairs at distance d >= 1}, "unreachable",
              "outdeg": [...], "indeg": [...]}]} on stdout.

- networkx.triadic_census (Hagberg, Schult & Swart 2008, Exploring network structure, dynamics, and
  function using NetworkX, SciPy 2008; the census of Holland & Leinhardt 1970, computed there by the
  Batagelj & Mrvar 2001 algorithm);
- networkx.overall_reciprocity for 2M / L;
- networkx.all_pairs_shortest_path_length for directed geodesic distances;
- mutual / asymmetric / null dyads by a plain pair loop (Wasserman & Faust 1994, ch. 13).

With the argument "--time FILE REPEATS" it instead reads one graph from FILE (same JSON shape, one graph),
times networkx.triadic_census REPEATS times after start-up and prints {"seconds": per-call time}.
"""
import json
import sys
import time

import networkx as nx


def graph_of(g):
    G = nx.DiGraph()
    G.add_nodes_from(range(g["n"]))
    G.add_edges_from(tuple(e) for e in g["edges"])
    return G


def stats(g):
    n = g["n"]
    G = graph_of(g)
    triads = nx.triadic_census(G) if n >= 3 else {}
    edges = set(tuple(e) for e in g["edges"])
    mutual = asym = null = 0
    for i in range(n):
        for j in range(i + 1, n):
            a = (i, j) in edges
            b = (j, i) in edges
            if a and b:
                mutual += 1
            elif a or b:
                asym += 1
            else:
                null += 1
    recip = nx.overall_reciprocity(G) if G.number_of_edges() > 0 else None
    dist = {}
    reachable = 0
    for src, lengths in nx.all_pairs_shortest_path_length(G):
        for dst, d in lengths.items():
            if dst == src:
                continue
            dist[d] = dist.get(d, 0) + 1
            reachable += 1
    return {
        "triads": {k: int(v) for k, v in triads.items()},
        "mutual": mutual,
        "asymmetric": asym,
        "null": null,
        "reciprocity": recip,
        "distances": {str(d): c for d, c in sorted(dist.items())},
        "unreachable": n * (n - 1) - reachable,
        "outdeg": [G.out_degree(v) for v in range(n)],
        "indeg": [G.in_degree(v) for v in range(n)],
    }


def main():
    if len(sys.argv) >= 2 and sys.argv[1] == "--time":
        with open(sys.argv[2]) as f:
            g = json.load(f)
        repeats = int(sys.argv[3])
        G = graph_of(g)
        nx.triadic_census(G)  # warm-up
        t0 = time.perf_counter()
        for _ in range(repeats):
            nx.triadic_census(G)
        print(json.dumps({"seconds": (time.perf_counter() - t0) / repeats}))
        return
    data = json.load(sys.stdin)
    json.dump({"results": [stats(g) for g in data["graphs"]]}, sys.stdout)


if __name__ == "__main__":
    main()
