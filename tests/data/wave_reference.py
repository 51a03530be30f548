#!/usr/bin/python3
"""Reference wave summaries for tests/data/summaries.test.ts.

Reads {"n": int, "waves": [[[i, j], ...], ...]} (tie lists, no missing pairs) on stdin and writes
{"waves": [{"density", "reciprocity"}], "changes": [{"created", "dissolved", "stable", "jaccard"}]}.

- density: networkx.density (directed: L / (n (n - 1)));
- reciprocity: networkx.overall_reciprocity (2M / L; Wasserman & Faust 1994, ch. 13);
- changes between consecutive waves by Python set operations on the tie sets; Jaccard index
  |A & B| / |A | B| (Jaccard 1912).
Networkx is Debian's python3-networkx (Hagberg, Schult & Swart 2008).
"""
import json
import sys

import networkx as nx

data = json.load(sys.stdin)
n = data["n"]
waves = []
sets = []
for ties in data["waves"]:
    G = nx.DiGraph()
    G.add_nodes_from(range(n))
    G.add_edges_from(tuple(t) for t in ties)
    waves.append({"density": nx.density(G), "reciprocity": nx.overall_reciprocity(G) if G.number_of_edges() else None})
    sets.append({tuple(t) for t in ties})
changes = []
for a, b in zip(sets, sets[1:]):
    union = a | b
    changes.append({
        "created": len(b - a),
        "dissolved": len(a - b),
        "stable": len(a & b),
        "jaccard": len(a & b) / len(union) if union else None,
    })
json.dump({"waves": waves, "changes": changes}, sys.stdout)
