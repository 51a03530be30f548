"""Jaccard index of pairs of 0/1 vectors with scipy (Debian python3-scipy).

stdin: {"cases": [{"u": [...], "v": [...]}]}  ->  stdout: {"jaccard": [J, ...]}
scipy.spatial.distance.jaccard(u, v) is the dissimilarity (c_TF + c_FT) / (c_TT + c_TF + c_FT),
so the Jaccard index (Jaccard 1912) is 1 minus it; scipy returns 0 for two all-zero vectors, which
we report as null (undefined).
"""
import json
import sys

import numpy as np
from scipy.spatial.distance import jaccard


def main():
    data = json.load(sys.stdin)
    out = []
    for c in data["cases"]:
        u = np.asarray(c["u"], dtype=bool)
        v = np.asarray(c["v"], dtype=bool)
        out.append(None if not (u.any() or v.any()) else 1.0 - float(jaccard(u, v)))
    json.dump({"jaccard": out}, sys.stdout)


if __name__ == "__main__":
    main()
