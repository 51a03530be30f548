"""Triad census with networkx (Debian python3-networkx), for checking observed statistics.

stdin: {"graphs": [{"n": 5, "edges": [[0, 1], ...]}]}  ->  stdout: {"census": [{"003": 4, ...}, ...]}
networkx.triadic_census uses the 16 standard labels of Holland & Leinhardt (1970).
"""
import json
import sys

import networkx as nx


def main():
    data = json.load(sys.stdin)
    out = []
    for g in data["graphs"]:
        G = nx.DiGraph()
        G.add_nodes_from(range(g["n"]))
        G.add_edges_from(tuple(e) for e in g["edges"])
        out.append(nx.triadic_census(G))
    json.dump({"census": out}, sys.stdout)


if __name__ == "__main__":
    main()
