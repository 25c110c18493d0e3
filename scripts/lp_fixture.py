#!/usr/bin/env python3
"""Reference LP values for the one-index cutting-plane bound, computed with
scipy.optimize.linprog (HiGHS inside).

Generates seeded random street networks (a two-way spanning tree plus extra
links, some one-way, some parallel, a few loops; about two thirds of the
links required, some of them Forward-only), and for each a fixed list of
junction sets: every single junction, the sets at least a given distance from
the yard, random sets and random connected sets. For each set S (the side
without the yard) it computes, independently of the Rust code, the
right-hand side of the cut inequality x(delta(S)) >= rhs:

    k(S)   = max(ceil(d(S)/Q), ceil(t(S)/L), 1) if a task has an end in S, else 0
    r(S)   = number of tasks with exactly one end in S
    rhs(S) = max(2 k(S) - r(S), r(S) mod 2)

(d, t: demand and service time of the tasks with an end in S; Q capacity;
L shift limit, if any; service time = service cost here). Sets with rhs <= 0
are dropped. The LP has one variable per non-loop link (parallel links kept
apart, unlike the Rust formulation, which keeps the cheapest of each pair:
the optimum is the same) and minimises the deadhead cost.

Writes tests/fixtures/lp_cuts.json with the scipy version.
Run from the crate root:  python3 scripts/lp_fixture.py
"""
import heapq
import json
import random

import scipy
from scipy.optimize import linprog

SEED = 20261213


def network(rng, n):
    links = []  # [from, to, cost, oneway, demand or None, forward_only]
    for v in range(1, n):
        u = rng.randrange(v)
        links.append([u, v, rng.randint(1, 30), False, None, False])
    for _ in range(rng.randint(n, 2 * n)):
        u, v = rng.randrange(n), rng.randrange(n)
        if u == v and rng.random() < 0.7:
            continue
        links.append([u, v, rng.randint(0, 30), rng.random() < 0.25, None, False])
    for _ in range(rng.randint(1, 3)):  # parallel links
        l = rng.choice(links)
        links.append([l[1], l[0], rng.randint(1, 30), False, None, False])
    for l in links:
        if rng.random() < 0.65:
            l[4] = rng.randint(0, 12)
            l[5] = l[3] or rng.random() < 0.2
    if all(l[4] is None for l in links):
        links[0][4] = 5
    return links


def tasks_of(links):
    return [(l[0], l[1], l[4], l[2]) for l in links if l[4] is not None]


def rhs(tasks, side, q, shift):
    d = t = r = 0
    touch = False
    for a, b, dem, time in tasks:
        ia, ib = a in side, b in side
        if ia or ib:
            touch = True
            d += dem
            t += time
        if ia != ib:
            r += 1
    if not touch:
        return 0
    k = max(-(-d // q), 1)
    if shift is not None:
        k = max(k, -(-t // shift))
    return max(2 * k - r, r % 2)


def levels(n, links, depot):
    adj = [[] for _ in range(n)]
    for u, v, c, *_ in links:
        adj[u].append((v, c))
        adj[v].append((u, c))
    dist = [None] * n
    heap = [(0, depot)]
    while heap:
        d, v = heapq.heappop(heap)
        if dist[v] is not None:
            continue
        dist[v] = d
        for w, c in adj[v]:
            if dist[w] is None:
                heapq.heappush(heap, (d + c, w))
    ts = sorted({d for d in dist if d and d > 0})
    return [{v for v in range(n) if dist[v] is not None and dist[v] >= t} for t in ts], adj


def candidate_sets(rng, n, links, depot):
    sets, adj = levels(n, links, depot)
    sets += [{v} for v in range(n)]
    for _ in range(25):
        sets.append({v for v in range(n) if rng.random() < 0.4})
    for _ in range(15):
        s = {rng.randrange(n)}
        for _ in range(rng.randint(1, n - 1)):
            v = rng.choice(sorted(s))
            w, _ = rng.choice(adj[v]) if adj[v] else (v, 0)
            s.add(w)
        sets.append(s)
    out, seen = [], set()
    for s in sets:
        side = frozenset(range(n)) - s if depot in s else frozenset(s)
        if side and side not in seen:
            seen.add(side)
            out.append(side)
    return out


def instance(rng, idx):
    n = rng.randint(7, 13)
    depot = rng.randrange(n)
    links = network(rng, n)
    tasks = tasks_of(links)
    total = sum(t[2] for t in tasks)
    q = max(max(t[2] for t in tasks), 1, -(-total // rng.randint(2, 4)))
    shift = None
    if idx % 3 == 2:
        shift = max(max(t[3] for t in tasks), 1, sum(t[3] for t in tasks) // 3)
    cuts = []
    for side in candidate_sets(rng, n, links, depot):
        r = rhs(tasks, side, q, shift)
        if r > 0:
            cuts.append({"set": sorted(side), "rhs": r})
    cols = [i for i, l in enumerate(links) if l[0] != l[1]]
    a_ub = []
    for c in cuts:
        side = set(c["set"])
        a_ub.append([-1.0 if (links[i][0] in side) != (links[i][1] in side) else 0.0 for i in cols])
    res = linprog(
        [links[i][2] for i in cols],
        A_ub=a_ub,
        b_ub=[-c["rhs"] for c in cuts],
        bounds=[(0, None)] * len(cols),
        method="highs",
    )
    assert res.status == 0, res.message
    return {
        "name": f"random-{idx}",
        "n": n,
        "depot": depot,
        "capacity": q,
        "shift_limit": shift,
        "links": links,
        "cuts": cuts,
        "lp_value": res.fun,
    }


def main():
    rng = random.Random(SEED)
    out = {
        "generator": "scripts/lp_fixture.py",
        "scipy": scipy.__version__,
        "instances": [instance(rng, i) for i in range(8)],
    }
    with open("tests/fixtures/lp_cuts.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print("wrote tests/fixtures/lp_cuts.json with scipy", scipy.__version__)
    for inst in out["instances"]:
        print(inst["name"], len(inst["links"]), "links", len(inst["cuts"]), "cuts", inst["lp_value"])


if __name__ == "__main__":
    main()
