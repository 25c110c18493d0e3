#!/usr/bin/env python3
"""Reference values for the Chinese postman tests, computed with networkx.

Generates seeded random connected multigraphs and computes their postman
values with networkx (version printed into the fixture):

* undirected: sum of edge costs + minimum-weight perfect matching
  (nx.min_weight_matching) of the odd-degree vertices on shortest-path
  distances (nx.single_source_dijkstra_path_length);
* directed (strongly connected multidigraphs): sum of arc costs + min-cost
  flow (nx.min_cost_flow_cost) balancing in- and out-degrees.

Writes tests/fixtures/postman_undirected.json and postman_directed.json.
Each graph is {"n": vertices, "e": [u0, v0, c0, u1, v1, c1, ...], "value": V,
"odd": number of odd vertices (or unbalanced units)}.

Run from the crate root:  python3 scripts/postman_fixtures.py
"""
import json
import random
import sys

import networkx as nx

SEED = 20261202


def undirected_graph(rng, n, kind):
    edges = []
    cost = lambda: rng.randint(0, 100) if rng.random() < 0.05 else rng.randint(1, 100)
    if kind == "eulerian":
        # A cycle through all vertices plus random closed cycles: all degrees even.
        order = list(range(n))
        rng.shuffle(order)
        if n == 1:
            edges.append((0, 0, cost()))
        else:
            for i in range(n):
                edges.append((order[i], order[(i + 1) % n], cost()))
        for _ in range(rng.randint(0, 3)):
            k = rng.randint(2, max(2, min(n, 8)))
            cyc = [rng.randrange(n) for _ in range(k)]
            for i in range(k):
                edges.append((cyc[i], cyc[(i + 1) % k], cost()))
    else:
        # A random spanning tree plus extra edges (parallel edges and loops allowed).
        for v in range(1, n):
            edges.append((rng.randrange(v), v, cost()))
        extra = {"sparse": n // 4, "dense": 2 * n, "tree": 0}[kind]
        for _ in range(extra):
            u, v = rng.randrange(n), rng.randrange(n)
            if u == v and rng.random() < 0.8:
                continue
            edges.append((u, v, cost()))
        for _ in range(rng.randint(0, 3)):
            if edges:
                edges.append(rng.choice(edges))
    return edges


def undirected_value(n, edges):
    g = nx.MultiGraph()
    g.add_nodes_from(range(n))
    for u, v, c in edges:
        g.add_edge(u, v, weight=c)
    assert nx.is_connected(g)
    odd = [v for v, d in g.degree() if d % 2 == 1]
    k = nx.Graph()
    for i, a in enumerate(odd):
        d = nx.single_source_dijkstra_path_length(g, a, weight="weight")
        for b in odd[i + 1:]:
            k.add_edge(a, b, weight=d[b])
    extra = 0
    if odd:
        m = nx.min_weight_matching(k, weight="weight")
        assert 2 * len(m) == len(odd)
        extra = sum(k[a][b]["weight"] for a, b in m)
    return sum(c for _, _, c in edges) + extra, len(odd)


def directed_graph(rng, n):
    arcs = []
    order = list(range(n))
    rng.shuffle(order)
    for i in range(n):
        arcs.append((order[i], order[(i + 1) % n], rng.randint(1, 100)))
    for _ in range(rng.randint(0, 2 * n)):
        u, v = rng.randrange(n), rng.randrange(n)
        if u != v or rng.random() < 0.1:
            arcs.append((u, v, rng.randint(0, 100)))
    return arcs


def directed_value(n, arcs):
    g = nx.MultiDiGraph()
    g.add_nodes_from(range(n))
    for u, v, c in arcs:
        g.add_edge(u, v, weight=c)
    assert nx.is_strongly_connected(g)
    # Flow network: cheapest arc per ordered pair, unbounded capacity.
    f = nx.DiGraph()
    for v in range(n):
        # networkx: negative demand = supply. A vertex with more arcs in than
        # out must send the difference (extra paths leave it).
        f.add_node(v, demand=g.out_degree(v) - g.in_degree(v))
    for u, v, c in arcs:
        if u != v and (not f.has_edge(u, v) or f[u][v]["weight"] > c):
            f.add_edge(u, v, weight=c)
    unbalanced = sum(max(0, g.in_degree(v) - g.out_degree(v)) for v in range(n))
    return sum(c for _, _, c in arcs) + nx.min_cost_flow_cost(f), unbalanced


def flat(edges):
    return [x for e in edges for x in e]


def main():
    rng = random.Random(SEED)
    und = []
    sizes = [rng.randint(1, 12) for _ in range(90)] + [rng.randint(13, 60) for _ in range(80)]
    sizes += [rng.randint(61, 150) for _ in range(25)] + [rng.randint(151, 300) for _ in range(15)]
    for i, n in enumerate(sizes):
        kind = ["eulerian", "tree", "sparse", "dense"][i % 4]
        edges = undirected_graph(rng, n, kind)
        value, odd = undirected_value(n, edges)
        und.append({"n": n, "kind": kind, "odd": odd, "value": value, "e": flat(edges)})
        print(f"undirected {i}: n={n} {kind} odd={odd}", file=sys.stderr)
    di = []
    dsizes = [rng.randint(1, 12) for _ in range(90)] + [rng.randint(13, 80) for _ in range(80)]
    dsizes += [rng.randint(81, 300) for _ in range(40)]
    for i, n in enumerate(dsizes):
        arcs = directed_graph(rng, n)
        value, unb = directed_value(n, arcs)
        di.append({"n": n, "odd": unb, "value": value, "e": flat(arcs)})
    meta = {"generator": "scripts/postman_fixtures.py", "seed": SEED,
            "networkx": nx.__version__, "python": sys.version.split()[0]}
    for name, graphs in [("undirected", und), ("directed", di)]:
        with open(f"tests/fixtures/postman_{name}.json", "w") as fh:
            json.dump({"meta": meta, "graphs": graphs}, fh, separators=(",", ":"))
            fh.write("\n")
    print(f"wrote {len(und)} undirected and {len(di)} directed graphs", file=sys.stderr)


if __name__ == "__main__":
    main()
