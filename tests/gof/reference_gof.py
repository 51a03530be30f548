"""Independent reference for Wavefit's goodness-of-fit numbers, computed with numpy (Debian python3-numpy).

Reads JSON from stdin:
  {"quantiles": [{"values": [...], "probs": [...]}, ...],
   "mahalanobis": [{"sim": [[...], ...], "obs": [...], "tol": 1e-10}, ...]}
Writes JSON to stdout:
  {"quantiles": [[q, ...], ...],
   "mahalanobis": [{"d_obs": x, "d_sim": [...], "p": x, "rank": k, "constant": [...], "out_of_support": [...]}, ...]}

Quantiles: numpy.quantile with its default method ("linear"), which is Hyndman & Fan (1996) type 7.
Mahalanobis: columns whose simulated values are all equal are dropped (METHODS.md section 5); the
Moore-Penrose inverse is numpy.linalg.pinv of the sample covariance (ddof=1) with rcond = tol (singular
values below tol * largest are treated as zero); p = (1 + #{d_sim >= d_obs}) / (N + 1) (North, Curtis &
Sham 2002), with d_sim within a relative 1e-12 of d_obs counted as ties. With "reference": "pooled" the
mean and covariance come from the simulated vectors and the observed one together.
"""
import json
import sys

import numpy as np


def mahalanobis(case):
    sim = np.asarray(case["sim"], dtype=float)
    obs = np.asarray(case["obs"], dtype=float)
    tol = float(case.get("tol", 1e-10))
    n = sim.shape[0]
    constant = [k for k in range(sim.shape[1]) if np.all(sim[:, k] == sim[0, k])]
    oos = [k for k in constant if obs[k] != sim[0, k]]
    keep = [k for k in range(sim.shape[1]) if k not in constant]
    if not keep:
        d_sim = np.zeros(n)
        d_obs = 0.0
        rank = 0
    else:
        s = sim[:, keep]
        o = obs[keep]
        ref = np.vstack([s, o]) if case.get("reference") == "pooled" else s
        mean = ref.mean(axis=0)
        cov = np.atleast_2d(np.cov(ref, rowvar=False, ddof=1))
        pinv = np.linalg.pinv(cov, rcond=tol, hermitian=True)
        rank = int(np.linalg.matrix_rank(cov, tol=tol * np.max(np.linalg.eigvalsh(cov)), hermitian=True))
        dev = s - mean
        d_sim = np.einsum("ij,jk,ik->i", dev, pinv, dev)
        do = o - mean
        d_obs = float(do @ pinv @ do)
    p = (1 + int(np.sum(d_sim >= d_obs * (1 - 1e-12)))) / (n + 1)
    return {"d_obs": d_obs, "d_sim": d_sim.tolist(), "p": p, "rank": rank, "constant": constant, "out_of_support": oos}


def main():
    data = json.load(sys.stdin)
    out = {
        "quantiles": [np.quantile(np.asarray(c["values"], dtype=float), c["probs"]).tolist() for c in data.get("quantiles", [])],
        "mahalanobis": [mahalanobis(c) for c in data.get("mahalanobis", [])],
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
