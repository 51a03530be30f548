"""Binomial upper tail P(X >= x) for X ~ Binomial(K, 1/m), with scipy.stats.binom.sf (Debian's scipy).
JSON in: [[K, x, m], ...]; JSON out: [p, ...]."""
import json, sys
from scipy.stats import binom
cases = json.load(sys.stdin)
print(json.dumps([float(binom.sf(x - 1, K, 1.0 / m)) for K, x, m in cases]))
