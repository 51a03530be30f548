"""Independent reference for goodness of fit over all periods together (numpy, networkx; Debian packages).

stdin: {"periods": [{"sim": [[...], ...], "obs": [...] | null, "graph": {"n": 24, "edges": [[0, 1], ...]} | null}, ...],
        "components": ["003", ...] (triad labels when "graph" is given), "probs": [...], "tol": 1e-10}
stdout: {"sim": [[...], ...], "obs": [...], "quantiles": [[...], ...], "pooled": {...}, "simulated_only": {...}}

Chain c's summed vector is the sum over periods of row c of each period's matrix (numpy, elementwise).
The observed vector is the sum over periods of each period's observed end wave: with "graph" it is
networkx.triadic_census of that wave's ties (Holland & Leinhardt 1970 labels), else the given "obs".
Quantiles are numpy.quantile (type 7, Hyndman & Fan 1996); the Mahalanobis distance and Monte Carlo
p-value are those of reference_gof.py (numpy.linalg.pinv; North, Curtis & Sham 2002).
"""
import json
import os
import sys

import networkx as nx
import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from reference_gof import mahalanobis  # noqa: E402


def observed_of(period, components):
    g = period.get("graph")
    if g is None:
        return np.asarray(period["obs"], dtype=float)
    G = nx.DiGraph()
    G.add_nodes_from(range(g["n"]))
    G.add_edges_from(tuple(e) for e in g["edges"])
    census = nx.triadic_census(G)
    return np.asarray([census[c] for c in components], dtype=float)


def main():
    data = json.load(sys.stdin)
    periods = data["periods"]
    sim = sum(np.asarray(p["sim"], dtype=float) for p in periods)
    obs = sum(observed_of(p, data.get("components")) for p in periods)
    tol = float(data.get("tol", 1e-10))
    out = {
        "sim": sim.tolist(),
        "obs": obs.tolist(),
        "quantiles": [np.quantile(sim[:, k], data["probs"]).tolist() for k in range(sim.shape[1])],
        "pooled": mahalanobis({"sim": sim.tolist(), "obs": obs.tolist(), "tol": tol, "reference": "pooled"}),
        "simulated_only": mahalanobis({"sim": sim.tolist(), "obs": obs.tolist(), "tol": tol}),
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
