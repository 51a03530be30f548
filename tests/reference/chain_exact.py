#!/usr/bin/python3
"""Exact distribution of the actor-oriented network chain on a few actors, for checking the simulator.

Reads a JSON object {"cases": [...]} on stdin and writes {"results": [...]} on stdout.
Each case: {"n": int, "rate": float, "start": [[i, j], ...],
            "effects": [{"id": str, "param": float, "covariate": [numbers or null] (optional)}],
            "method": "expm" | "uniformisation" (default "expm"), "derivatives": bool (optional)}

The model is built here from its definition alone, independently of the TypeScript engine:
- every actor has opportunities at rate lambda; when i acts it picks an option h in {i} U {j != i}
  with probability exp(f_i(x(+-ih))) / sum exp(f_i(x(+-ih'))), f_i = sum_k beta_k s_ik, x(+-ii) = x;
- s_ik is evaluated by brute force from its defining sum (no change-statistic formulas are used).
So Q[x, x(+-ij)] = lambda * p_ij(x), and the law at t = 1 is the start row of expm(Q)
(Moler & Van Loan 2003, Nineteen dubious ways to compute the exponential of a matrix, SIAM Review 45;
scipy.linalg.expm implements Al-Mohy & Higham 2009). "uniformisation" computes the same law as
sum_r Poisson(r; n lambda) pi0 K^r with the one-ministep kernel K (Jensen 1953; METHODS.md 7a).

Model definitions: Snijders (2001), The statistical evaluation of social network dynamics,
Sociological Methodology 31; statistics s_i as in Wavefit METHODS.md 2.1 (first table), covariate
centring and similarity as in METHODS.md 1.5-1.7.
"""
import itertools
import json
import math
import sys

import numpy as np
from scipy.linalg import expm
from scipy.sparse import csr_matrix
from scipy.stats import poisson


def centred(values):
    obs = [v for v in values if v is not None]
    mean = sum(obs) / len(obs)
    return [0.0 if v is None else v - mean for v in values], obs


def make_stat(effect, n):
    """Return s(x, i) for one effect: ego i's statistic on the 0/1 matrix x (list of lists)."""
    eid = effect["id"]
    cov = effect.get("covariate")
    if eid == "density":
        return lambda x, i: sum(x[i][j] for j in range(n))
    if eid == "reciprocity":
        return lambda x, i: sum(x[i][j] * x[j][i] for j in range(n))
    if eid == "transitive_triplets":
        return lambda x, i: sum(x[i][j] * x[i][h] * x[h][j] for j in range(n) for h in range(n))
    if eid == "three_cycles":
        return lambda x, i: sum(x[i][j] * x[j][h] * x[h][i] for j in range(n) for h in range(n))
    if eid == "transitive_ties":
        return lambda x, i: sum(
            x[i][j] * (1 if sum(x[i][h] * x[h][j] for h in range(n)) > 0 else 0) for j in range(n))
    if eid == "indegree_popularity":
        return lambda x, i: sum(x[i][j] * sum(x[h][j] for h in range(n)) for j in range(n))
    if eid == "outdegree_activity":
        return lambda x, i: sum(x[i]) ** 2
    if eid == "covariate_ego":
        c, _ = centred(cov)
        return lambda x, i: c[i] * sum(x[i])
    if eid == "covariate_alter":
        c, _ = centred(cov)
        return lambda x, i: sum(x[i][j] * c[j] for j in range(n))
    if eid == "covariate_similarity":
        c, obs = centred(cov)
        rng = max(obs) - min(obs)
        sim = [[1 - abs(c[a] - c[b]) / rng for b in range(n)] for a in range(n)]
        simbar = sum(sim[a][b] for a in range(n) for b in range(n) if a != b) / (n * (n - 1))
        return lambda x, i: sum(x[i][j] * (sim[i][j] - simbar) for j in range(n))
    if eid == "same_covariate":
        return lambda x, i: sum(
            x[i][j] for j in range(n) if cov[i] is not None and cov[i] == cov[j])
    raise ValueError("unknown effect " + eid)


def states(n):
    pairs = [(i, j) for i in range(n) for j in range(n) if i != j]
    return pairs, 1 << len(pairs)


def to_matrix(code, n, pairs):
    x = [[0] * n for _ in range(n)]
    for b, (i, j) in enumerate(pairs):
        if code >> b & 1:
            x[i][j] = 1
    return x


def build(case, params):
    n = case["n"]
    pairs, count = states(n)
    index = {p: b for b, p in enumerate(pairs)}
    stats = [make_stat(e, n) for e in case["effects"]]
    lam = case["rate"]
    # K: one-ministep kernel (an acting actor chosen uniformly), Q = n lambda (K - I).
    rows, cols, vals = [], [], []
    for code in range(count):
        x = to_matrix(code, n, pairs)
        for i in range(n):
            base = sum(b * s(x, i) for b, s in zip(params, stats))
            util = []
            targets = []
            for h in range(n):
                if h == i:
                    util.append(0.0)
                    targets.append(code)
                    continue
                y_code = code ^ (1 << index[(i, h)])
                y = to_matrix(y_code, n, pairs)
                util.append(sum(b * s(y, i) for b, s in zip(params, stats)) - base)
                targets.append(y_code)
            m = max(util)
            w = [math.exp(u - m) for u in util]
            tot = sum(w)
            for t, wt in zip(targets, w):
                rows.append(code)
                cols.append(t)
                vals.append(wt / tot / n)
    K = csr_matrix((vals, (rows, cols)), shape=(count, count))  # duplicates (no-change entries) are summed
    return K, pairs, count, stats


def law(case, params, method):
    n = case["n"]
    K, pairs, count, stats = build(case, params)
    start = 0
    index = {p: b for b, p in enumerate(pairs)}
    for i, j in case["start"]:
        start |= 1 << index[(i, j)]
    mu = n * case["rate"]
    if method == "expm":
        Q = mu * (K.toarray() - np.eye(count))
        p = expm(Q)[start]
    else:
        vec = np.zeros(count)
        vec[start] = 1.0
        p = np.zeros(count)
        rmax = int(mu + 12 * math.sqrt(mu) + 30)
        for r in range(rmax + 1):
            p += poisson.pmf(r, mu) * vec
            vec = K.T @ vec
    return p, pairs, count, stats, start


def summarise(case, params, method):
    n = case["n"]
    p, pairs, count, stats, start = law(case, params, method)
    npairs = len(pairs)
    dist_l = [0.0] * (npairs + 1)
    dist_m = [0.0] * (n * (n - 1) // 2 + 1)
    mean_stats = [0.0] * len(stats)
    mean_hamming = 0.0
    for code in range(count):
        pc = p[code]
        x = to_matrix(code, n, pairs)
        L = bin(code).count("1")
        M = sum(x[i][j] * x[j][i] for i in range(n) for j in range(i + 1, n))
        dist_l[L] += pc
        dist_m[M] += pc
        for k, s in enumerate(stats):
            mean_stats[k] += pc * sum(s(x, i) for i in range(n))
        mean_hamming += pc * bin(code ^ start).count("1")
    return {
        "total": float(p.sum()),
        "distL": dist_l,
        "distM": dist_m,
        "meanL": sum(l * q for l, q in enumerate(dist_l)),
        "meanM": sum(m * q for m, q in enumerate(dist_m)),
        "meanStats": mean_stats,
        "meanHamming": mean_hamming,
    }


def main():
    data = json.load(sys.stdin)
    results = []
    for case in data["cases"]:
        method = case.get("method", "expm")
        params = [e["param"] for e in case["effects"]]
        out = summarise(case, params, method)
        if case.get("derivatives"):
            # Central differences of the exact E[L(1)] in each beta and in lambda (step 1e-4: error ~1e-8).
            h = 1e-4
            d_beta = []
            for k in range(len(params)):
                up = list(params)
                dn = list(params)
                up[k] += h
                dn[k] -= h
                d_beta.append((summarise(case, up, method)["meanL"] - summarise(case, dn, method)["meanL"]) / (2 * h))
            c_up = dict(case, rate=case["rate"] + h)
            c_dn = dict(case, rate=case["rate"] - h)
            d_rate_l = (summarise(c_up, params, method)["meanL"] - summarise(c_dn, params, method)["meanL"]) / (2 * h)
            d_rate_c = (summarise(c_up, params, method)["meanHamming"] - summarise(c_dn, params, method)["meanHamming"]) / (2 * h)
            out["dMeanL_dBeta"] = d_beta
            out["dMeanL_dRate"] = d_rate_l
            out["dMeanHamming_dRate"] = d_rate_c
        results.append(out)
    json.dump({"results": results}, sys.stdout)


if __name__ == "__main__":
    main()
