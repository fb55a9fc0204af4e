"""Reference values for plan/agreement tests.

Reads a JSON list of square count tables (rows: first labeler, columns:
second) on stdin and writes, per table, a JSON object with
  kappa, kappa_var, kappa_low, kappa_upp -- statsmodels.stats.inter_rater.cohens_kappa
                                           (Fleiss-Cohen-Everitt 1969 variance, 95 % normal CI;
                                           the bounds are null where statsmodels gives NaN
                                           because rounding made the variance slightly negative)
  ac1, ac1_pe, ac1_se                    -- Gwet's AC1 written here from the expanded
                                           two-rater variance of Gwet (2008, BJMSP 61:29-48):
    v = [pa(1-pa) - 4(1-g)(S1/(q-1) - pa*pe) + 4(1-g)^2 (S2/(q-1)^2 - pe^2)] / (n (1-pe)^2)
    S1 = sum_k p_kk (1 - pi_k),  S2 = sum_k sum_l p_kl (1 - (pi_k + pi_l)/2)^2
Run with Debian's /usr/bin/python3 (python3-statsmodels).
"""
import json
import sys

import numpy as np
from statsmodels.stats.inter_rater import cohens_kappa


def ac1(table):
    p = np.asarray(table, dtype=float)
    n = p.sum()
    p = p / n
    q = p.shape[0]
    pi = (p.sum(axis=1) + p.sum(axis=0)) / 2.0
    pa = float(np.trace(p))
    pe = float(np.sum(pi * (1.0 - pi)) / (q - 1))
    g = (pa - pe) / (1.0 - pe)
    s1 = float(np.sum(np.diag(p) * (1.0 - pi)))
    s2 = 0.0
    for k in range(q):
        for l in range(q):
            s2 += p[k, l] * (1.0 - (pi[k] + pi[l]) / 2.0) ** 2
    v = (pa * (1 - pa)
         - 4 * (1 - g) * (s1 / (q - 1) - pa * pe)
         + 4 * (1 - g) ** 2 * (s2 / (q - 1) ** 2 - pe ** 2)) / (n * (1 - pe) ** 2)
    return g, pe, float(np.sqrt(max(v, 0.0)))


def finite(x):
    x = float(x)
    return None if np.isnan(x) else x


def main():
    tables = json.load(sys.stdin)
    out = []
    for t in tables:
        r = cohens_kappa(np.asarray(t, dtype=float))
        g, pe, se = ac1(t)
        out.append({
            "kappa": float(r.kappa),
            "kappa_var": float(r.var_kappa),
            "kappa_low": finite(r.kappa_low),
            "kappa_upp": finite(r.kappa_upp),
            "ac1": g,
            "ac1_pe": pe,
            "ac1_se": se,
        })
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
