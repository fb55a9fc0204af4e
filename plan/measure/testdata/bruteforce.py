"""Brute-force reference for the measures' design search (plan/measure).

Reads a problem as JSON on stdin and prints, as JSON, the fewest labels over
EVERY allocation (n_1, ..., n_H), 0 <= n_h <= N_h, such that every claim can
be met by counted sub-samples that fit in it, with every tail from
scipy.stats (hypergeom, binom). It shares no code with the Go search: it
restates the rules (the claim tests) and visits every allocation instead of
walking power curves and frontiers.

The rules restated:
  - a side (a set of strata and an event) counts a sub-sample proportional
    to its strata sizes, k_h = ceil(m*N_h/N_G), for some m; the labels must
    hold it: k_h <= n_h for its strata;
  - the test of "the side holds at least D events" has p-value
    hypergeom.cdf(s, N, D, k) for one stratum, and for several the count
    rule: mu* = fill D events into the strata in ascending k_h/N_h (ties in
    order), p = binom.cdf(s, M, mu*/M) when s <= mu* - 1, else 1 (M = sum k);
    the acceptance number is the largest s with p <= alpha;
  - power = P(S <= c) at the anticipated events (convolution of
    hypergeom.pmf);
  - a proportion (error, for, fdr) is met when its power is >= 1 - beta;
  - a ratio (fnr, fpr) with floor b0 (from the margins below the anticipated
    B0): the numerator side counts a record size of its curve at level
    alpha against a*(b0), the least A with A/(A + b0) >= ceiling (a record:
    its acceptance number and its power exceed those of every smaller size),
    with acceptance number c_A; the denominator side counts any size, and
    its acceptance number is the largest c with
    p_a(c_A, a*(L[j+1])) * p_b(c, N_b - L[j] + 1) <= alpha for every interval
    j of the floor's lattice L; it is met when power_a * power_b >= 1 - beta.
"""
import json
import math
import sys
from fractions import Fraction
from itertools import product

import numpy as np
from scipy.stats import binom, hypergeom


def snap_ceil(v):
    r = round(v)
    return int(r) if abs(v - r) <= 1e-9 else math.ceil(v)


def prop_counts(Ns, m):
    NG = sum(Ns)
    return [-(-m * N // NG) for N in Ns]


def max_prop(Ns, ns):
    NG = sum(Ns)
    return min([NG] + [n * NG // N for n, N in zip(ns, Ns)])


def least_mean(Ns, ks, D):
    order = sorted(range(len(Ns)), key=lambda h: Fraction(ks[h], Ns[h]))
    rest, mu = D, 0.0
    for h in order:
        d = min(rest, Ns[h])
        mu += ks[h] * d / Ns[h]
        rest -= d
        if rest == 0:
            break
    return mu


def pvalues(Ns, ks, D):
    """p(s, D) for s = 0 .. sum(ks), as an array."""
    M = sum(ks)
    s = np.arange(M + 1)
    if D <= 0:
        return np.ones(M + 1)
    if D > sum(Ns):
        return np.zeros(M + 1)
    if len(Ns) == 1:
        return hypergeom.cdf(s, Ns[0], D, ks[0])
    mu = least_mean(Ns, ks, D)
    if M == 0:
        return np.ones(1)
    p = binom.cdf(s, M, min(mu / M, 1.0))
    return np.where(s <= mu - 1, p, 1.0)


def pvalue(Ns, ks, s, D):
    return float(pvalues(Ns, ks, D)[s]) if 0 <= s <= sum(ks) else (0.0 if s < 0 else 1.0)


def accept_at(Ns, ks, D, alpha):
    size = sum(ks)
    if D > sum(Ns):
        return size
    ok = np.nonzero(pvalues(Ns, ks, D) <= alpha)[0]
    return int(ok.max()) if len(ok) else -1


def lattice(b0):
    L, d = [b0], 1
    while b0 - d > 0:
        L.append(b0 - d)
        d = max(d + 1, math.ceil(1.2 * d))
    return L + [0]


def cdf(Ns, ks, events, c):
    if c < 0:
        return 0.0
    dist = [1.0]
    for N, k, e in zip(Ns, ks, events):
        if k == 0:
            continue
        pmf = [float(v) for v in hypergeom.pmf(range(k + 1), N, e, k)]
        nxt = [0.0] * (len(dist) + k)
        for i, a in enumerate(dist):
            if a == 0:
                continue
            for j, b in enumerate(pmf):
                nxt[i + j] += a * b
        dist = nxt
    return min(1.0, sum(dist[: c + 1]))


def best_curve(Ns, events, D, alpha):
    """best[m] = the highest power of any sub-sample size m' <= m."""
    best, run = [], 0.0
    for m in range(sum(Ns) + 1):
        ks = prop_counts(Ns, m)
        p = cdf(Ns, ks, events, accept_at(Ns, ks, D, alpha))
        run = max(run, p)
        best.append(run)
    return best


def main():
    pr = json.load(sys.stdin)
    N = pr["N"]
    H = len(N)
    pos = pr["positives"]
    alpha, target = pr["alpha"], 1 - pr["beta"]

    def side(strata, ev, cand):
        def count(h):
            if ev == "pos":
                return pos[h]
            if ev == "neg":
                return N[h] - pos[h]
            return N[h] - pos[h] if pr["candidates"][cand][h] else pos[h]

        return {"strata": strata, "Ns": [N[h] for h in strata], "events": [count(h) for h in strata]}

    checks = []  # functions of the allocation: met or not
    for cl in pr["claims"]:
        j, meas, theta = cl["candidate"], cl["measure"], cl["ceiling"]
        P = [h for h in range(H) if pr["candidates"][j][h]]
        Q = [h for h in range(H) if not pr["candidates"][j][h]]
        if meas in ("error", "for", "fdr"):
            sd = {"error": side(list(range(H)), "wrong", j), "for": side(Q, "pos", j), "fdr": side(P, "neg", j)}[meas]
            D = snap_ceil(theta * sum(sd["Ns"]))
            best = best_curve(sd["Ns"], sd["events"], D, alpha)

            def met(n, tol, sd=sd, best=best):
                return best[max_prop(sd["Ns"], [n[h] for h in sd["strata"]])] >= target - tol

            checks.append(met)
            continue
        if meas == "fnr":
            a, b = side(Q, "pos", j), side(P, "neg", j)
        else:
            a, b = side(P, "neg", j), side(Q, "pos", j)
        A, B = sum(a["events"]), sum(b["Ns"]) - sum(b["events"])
        Nb = sum(b["Ns"])
        options, seen = [], set()  # (m_a, power_a, best power of b up to each m_b)
        for q in pr["margins"]:
            b0 = math.floor((1 - q) * B)
            if b0 < 1 or b0 in seen or A >= snap_ceil(theta * b0 / (1 - theta)):
                continue
            seen.add(b0)
            astar = snap_ceil(theta * b0 / (1 - theta))
            L = lattice(b0)
            alat = [snap_ceil(theta * L[j + 1] / (1 - theta)) for j in range(len(L) - 1)]
            clat = [Nb - L[j] + 1 for j in range(len(L) - 1)]
            best_c, best_p = -2, -1.0
            for ma in range(sum(a["Ns"]) + 1):
                ks = prop_counts(a["Ns"], ma)
                ca = accept_at(a["Ns"], ks, astar, alpha)
                if ca <= best_c:
                    continue
                best_c = ca
                pa = cdf(a["Ns"], ks, a["events"], ca)
                if pa <= best_p:
                    continue
                best_p = pa
                # a record: calibrate the denominator side to it
                tests = []
                for j in range(len(alat)):
                    pj = pvalue(a["Ns"], ks, ca, alat[j])
                    if pj > alpha:
                        tests.append((clat[j], alpha / pj))
                bcurve, run = [], 0.0
                for mb in range(Nb + 1):
                    kb = prop_counts(b["Ns"], mb)
                    cb = min([sum(kb)] + [accept_at(b["Ns"], kb, D, lvl) for D, lvl in tests])
                    run = max(run, cdf(b["Ns"], kb, b["events"], cb))
                    bcurve.append(run)
                options.append((ma, pa, bcurve))
                if pa >= 1 - 1e-12:
                    break  # the search stops a curve here too

        def met(n, tol, a=a, b=b, options=options):
            ma = max_prop(a["Ns"], [n[h] for h in a["strata"]])
            mb = max_prop(b["Ns"], [n[h] for h in b["strata"]])
            return any(m <= ma and pa * bc[mb] >= target - tol for m, pa, bc in options)

        checks.append(met)

    floor_n = [min(pr.get("min_per_stratum", 0), N[h]) for h in range(H)]

    def solve(tol):
        best_total, best_n = None, None
        for n in product(*[range(floor_n[h], N[h] + 1) for h in range(H)]):
            t = sum(n)
            if best_total is not None and t >= best_total:
                continue
            if all(c(n, tol) for c in checks):
                best_total, best_n = t, list(n)
        uniform = None
        for m in range(sum(N) + 1):
            n = [max(x, f) for x, f in zip(prop_counts(N, m), floor_n)]
            if all(c(n, tol) for c in checks):
                uniform = sum(n)
                break
        out = {"total": best_total, "sample": best_n, "uniform_total": uniform}
        if "check" in pr:
            out["check_met"] = all(c(pr["check"], tol) for c in checks)
        return out

    # feasibility at the target plus and minus a tolerance (the tails of two
    # implementations differ in the last digits)
    json.dump({"lenient": solve(pr["tolerance"]), "strict": solve(-pr["tolerance"])}, sys.stdout)


main()
