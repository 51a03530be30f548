"""Reference summaries of a re-fit study from its per-re-fit CSV, with numpy (Debian's python3).

Input (stdin, JSON): {"rows": [[estimate, se], ...], "truth": t}. Output: mean, sample SD (ddof=1),
mean SE, coverage of estimate +- 1.96 SE, Pearson correlation helper for pairs {"pairs": [[x..],[y..]]}.
"""
import json
import sys

import numpy as np

data = json.load(sys.stdin)
out = []
for item in data["params"]:
    est = np.array([r[0] for r in item["rows"]], dtype=float)
    se = np.array([r[1] for r in item["rows"]], dtype=float)
    t = float(item["truth"])
    out.append({
        "bias": float(est.mean() - t),
        "sd": float(est.std(ddof=1)),
        "meanSe": float(se.mean()),
        "coverage": float(np.mean(np.abs(est - t) <= 1.959963984540054 * se)),
    })
corr = [float(np.corrcoef(np.array(p[0]), np.array(p[1]))[0, 1]) for p in data["pairs"]]
print(json.dumps({"params": out, "corr": corr}))
