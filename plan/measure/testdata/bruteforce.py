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
    B0) is met when power_a(a*) * power_b(c*) >= 1 - beta, a* the least A
    with A/(A + b0) >= ceiling, c* = N_b - b0 + 1.
"""
import json
import math
import sys
from fractions import Fraction
from itertools import product

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


def pvalue(Ns, ks, s, D):
    if D <= 0:
        return 1.0
    if D > sum(Ns):
        return 0.0
    if len(Ns) == 1:
        return float(hypergeom.cdf(s, Ns[0], D, ks[0]))
    order = sorted(range(len(Ns)), key=lambda h: Fraction(ks[h], Ns[h]))
    rest, mu = D, 0.0
    for h in order:
        d = min(rest, Ns[h])
        mu += ks[h] * d / Ns[h]
        rest -= d
        if rest == 0:
            break
    M = sum(ks)
    if M == 0 or s > mu - 1:
        return 1.0
    return float(binom.cdf(s, M, min(mu / M, 1.0)))


def accept_at(Ns, ks, D, alpha):
    size = sum(ks)
    if D > sum(Ns):
        return size
    lo, hi = -1, size + 1  # p(lo) <= alpha (or lo = -1), p(hi) > alpha (virtual)
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if pvalue(Ns, ks, mid, D) <= alpha:
            lo = mid
        else:
            hi = mid
    return lo


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
        curves, seen = [], set()
        for q in pr["margins"]:
            b0 = math.floor((1 - q) * B)
            if b0 < 1 or b0 in seen or A >= snap_ceil(theta * b0 / (1 - theta)):
                continue
            seen.add(b0)
            astar = snap_ceil(theta * b0 / (1 - theta))
            cstar = sum(b["Ns"]) - b0 + 1
            curves.append((best_curve(a["Ns"], a["events"], astar, alpha), best_curve(b["Ns"], b["events"], cstar, alpha)))

        def met(n, tol, a=a, b=b, curves=curves):
            ma = max_prop(a["Ns"], [n[h] for h in a["strata"]])
            mb = max_prop(b["Ns"], [n[h] for h in b["strata"]])
            return any(ca[ma] * cb[mb] >= target - tol for ca, cb in curves)

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
