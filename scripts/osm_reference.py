#!/usr/bin/env python3
"""Outside reference for arcwright's map reader (`src/map/`).

Reads an OpenStreetMap PBF extract with pyosmium, builds the drivable street
network under the built-in refuse profile (`src/map/profiles/refuse.toml`,
read here with `tomllib`) by the rules below, keeps its largest strongly
connected part (networkx), and writes the counts and lengths to a JSON
fixture. It also exports the ways of the profile's road classes as a GeoJSON
FeatureCollection: read by arcwright's GeoJSON reader it must give the same
network (without turn restrictions, which GeoJSON cannot carry).

Rules (the same as `src/map/mod.rs` documents):

1. A way is a street when its `highway` value is a class of the profile, it is
   not `area=yes`, none of `access`, `vehicle`, `motor_vehicle`, `hgv` is in
   the profile's `closed_access`, its `service` is not in `closed_service`,
   and `oneway` is not `reversible` / `alternating`.
2. Direction: `oneway` yes/true/1 -> one way as drawn; -1/reverse -> one way
   against the drawing (the node list is reversed); no/false/0 -> two-way;
   absent -> one way when `junction` is roundabout/circular or the class is
   `motorway`, else two-way; any other value -> two-way.
3. Repeated consecutive node references are dropped; a node missing from the
   file breaks the way (clipped extracts); pieces of fewer than two nodes are
   dropped.
4. A node is a split node when it ends a piece or is used twice or more (by
   any pieces, or twice by one). Pieces are split at split nodes into segments.
5. Directed graph: a one-way segment is an arc, a two-way one two arcs. The
   largest strongly connected component (most nodes; ties: the one with the
   smallest node id) is kept, with every segment whose two ends are in it.
6. Contraction: a node where exactly two segment ends of two different
   segments meet is removed, joining the two segments, when both have the same
   class, name (`name`, else `ref`) and direction kind (both two-way, or both
   one-way with one arriving and one leaving). Chains become streets; a ring of
   removable nodes keeps its smallest node id as its junction.
7. Length: the sum of geodesic distances on the WGS84 ellipsoid (Karney's
   algorithm, `geographiclib`) between consecutive nodes.
8. Turn restrictions: relations `type=restriction` whose `restriction` (else
   `restriction:hgv`) value starts with `no_` or `only_`, with exactly one
   `from` way, one `via` node and one `to` way, where the via node is a
   junction of the kept network and streets ending at it come from the `from`
   way and from the `to` way.

Usage: python3 scripts/osm_reference.py ../shared/osm/helsinki.osm.pbf
       (writes, in tests/fixtures/osm/: helsinki_reference.json, the numbers;
        helsinki_streets.geojson, the GeoJSON export; helsinki_cut.osm, an
        OSM XML cut of the city centre, whose numbers are `cut` in the
        reference; no_highways.osm.pbf, three nodes and a building)

Libraries: osmium (pyosmium) 4.3.2, networkx 3.6.1, geographiclib 2.x,
Python 3.11 (tomllib).

Map data © OpenStreetMap contributors, ODbL 1.0.
"""

import json
import os
import sys
import tomllib
from importlib.metadata import version

import networkx as nx
import osmium
from geographiclib.geodesic import Geodesic

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
KEYS = ("highway", "name", "ref", "oneway", "junction", "access", "vehicle",
        "motor_vehicle", "hgv", "service", "area")


class Reader(osmium.SimpleHandler):
    def __init__(self):
        super().__init__()
        self.loc = {}
        self.ways = []
        self.rels = []
        self.rels_full = []

    def node(self, n):
        # Same float as the Rust side: the fixed-point value divided by 1e7.
        self.loc[n.id] = (n.location.x / 1e7, n.location.y / 1e7)

    def way(self, w):
        if "highway" in w.tags:
            tags = {k: w.tags[k] for k in KEYS if k in w.tags}
            self.ways.append((w.id, [n.ref for n in w.nodes], tags))

    def relation(self, r):
        if r.tags.get("type") == "restriction":
            rule = r.tags.get("restriction") or r.tags.get("restriction:hgv") or ""
            members = [(m.type, m.ref, m.role) for m in r.members]
            self.rels.append((r.id, rule, members))
            self.rels_full.append((r.id, ([(m.type, m.ref, m.role) for m in r.members],
                                          {t.k: t.v for t in r.tags})))


def direction(tags):
    """'two', 'fwd', 'back' or None (not drivable)."""
    v = tags.get("oneway")
    if v in ("yes", "true", "1"):
        return "fwd"
    if v in ("-1", "reverse"):
        return "back"
    if v in ("no", "false", "0"):
        return "two"
    if v in ("reversible", "alternating"):
        return None
    if v is None:
        if tags.get("junction") in ("roundabout", "circular") or tags["highway"] == "motorway":
            return "fwd"
    return "two"


def accepted(tags, profile):
    if tags["highway"] not in profile["classes"]:
        return False
    if tags.get("area") == "yes":
        return False
    for k in ("access", "vehicle", "motor_vehicle", "hgv"):
        if tags.get(k) in profile["closed_access"]:
            return False
    if tags.get("service") in profile["closed_service"]:
        return False
    return direction(tags) is not None


def pieces(refs, loc):
    out, cur, last = [], [], None
    for r in refs:
        if r == last:
            continue
        last = r
        if r not in loc:
            if len(cur) >= 2:
                out.append(cur)
            cur = []
            continue
        cur.append(r)
    if len(cur) >= 2:
        out.append(cur)
    return out


def geodesic(a, b):
    return Geodesic.WGS84.Inverse(a[1], a[0], b[1], b[0])["s12"]


def build(ways, rels, loc, profile):
    """ways: (id, refs, tags) already in drawing order. Returns the numbers."""
    segs_in = []  # (way id, node list, one_way, tags)
    for wid, refs, tags in ways:
        if not accepted(tags, profile):
            continue
        d = direction(tags)
        for p in pieces(refs, loc):
            if d == "back":
                p = p[::-1]
            segs_in.append((wid, p, d != "two", tags))
    uses = {}
    ends = set()
    for _, p, _, _ in segs_in:
        ends.add(p[0])
        ends.add(p[-1])
        for n in p:
            uses[n] = uses.get(n, 0) + 1
    split = lambda n: n in ends or uses[n] >= 2
    segs = []  # dict(way, nodes, oneway, cls, name)
    for wid, p, ow, tags in segs_in:
        start = 0
        for i in range(1, len(p)):
            if split(p[i]):
                segs.append(dict(way=wid, nodes=p[start:i + 1], oneway=ow,
                                 cls=tags["highway"],
                                 name=tags.get("name") or tags.get("ref")))
                start = i
    g = nx.DiGraph()
    for s in segs:
        a, b = s["nodes"][0], s["nodes"][-1]
        g.add_edge(a, b)
        if not s["oneway"]:
            g.add_edge(b, a)
    comps = sorted(nx.strongly_connected_components(g), key=lambda c: (-len(c), min(c)))
    keep = comps[0]
    kept = [s for s in segs if s["nodes"][0] in keep and s["nodes"][-1] in keep]
    dropped = [s for s in segs if not (s["nodes"][0] in keep and s["nodes"][-1] in keep)]
    streets = contract(kept)
    junctions = set()
    for st in streets:
        junctions.add(st["nodes"][0])
        junctions.add(st["nodes"][-1])
    for st in streets:
        st["length"] = sum(geodesic(loc[a], loc[b]) for a, b in zip(st["nodes"], st["nodes"][1:]))
    end_ways = {}
    for st in streets:
        end_ways.setdefault(st["nodes"][0], set()).add(st["ways"][0])
        end_ways.setdefault(st["nodes"][-1], set()).add(st["ways"][-1])
    restrictions = 0
    for rid, rule, members in rels:
        if not (rule.startswith("no_") or rule.startswith("only_")):
            continue
        fr = [m for m in members if m[2] == "from"]
        to = [m for m in members if m[2] == "to"]
        via = [m for m in members if m[2] == "via"]
        if len(fr) != 1 or len(to) != 1 or len(via) != 1:
            continue
        if fr[0][0] != "w" or to[0][0] != "w" or via[0][0] != "n":
            continue
        v = via[0][1]
        if v in junctions and fr[0][1] in end_ways.get(v, ()) and to[0][1] in end_ways.get(v, ()):
            restrictions += 1
    return dict(
        junctions=len(junctions),
        streets=len(streets),
        length_m=sum(st["length"] for st in streets),
        one_way_streets=sum(1 for st in streets if st["oneway"]),
        restrictions=restrictions,
        segments_before_scc=len(segs),
        dropped_segments=len(dropped),
    ), streets


def contract(segs):
    """Joins segments through removable nodes (rule 6)."""
    inc = {}
    for i, s in enumerate(segs):
        inc.setdefault(s["nodes"][0], []).append(i)
        inc.setdefault(s["nodes"][-1], []).append(i)

    def removable(n):
        e = inc[n]
        if len(e) != 2 or e[0] == e[1]:
            return False
        a, b = segs[e[0]], segs[e[1]]
        if (a["cls"], a["name"], a["oneway"]) != (b["cls"], b["name"], b["oneway"]):
            return False
        if a["oneway"]:
            arrive = [s for s in (a, b) if s["nodes"][-1] == n]
            leave = [s for s in (a, b) if s["nodes"][0] == n]
            return len(arrive) == 1 and len(leave) == 1
        return True

    rem = {n for n in inc if removable(n)}
    used = [False] * len(segs)
    streets = []

    def walk(start, i):
        """A street from junction `start` along segment i."""
        nodes, ways, cur = [start], [], start
        s = segs[i]
        while True:
            used[i] = True
            seq = s["nodes"] if s["nodes"][0] == cur else s["nodes"][::-1]
            nodes.extend(seq[1:])
            ways.append(s["way"])
            cur = seq[-1]
            if cur not in rem:
                break
            e = inc[cur]
            i = e[1] if e[0] == i else e[0]
            if used[i]:
                break
            s = segs[i]
        return dict(nodes=nodes, ways=ways, oneway=segs[i]["oneway"])

    for n in sorted(inc):
        if n in rem:
            continue
        for i in inc[n]:
            if used[i]:
                continue
            s = segs[i]
            if s["oneway"] and s["nodes"][0] != n:
                continue  # walked from its start
            streets.append(walk(n, i))
    # Rings made only of removable nodes: start at the smallest node id.
    for i, s in enumerate(segs):
        if used[i]:
            continue
        ring = ring_nodes(segs, inc, i)
        start = min(ring)
        j = next(j for j in inc[start] if not segs[j]["oneway"] or segs[j]["nodes"][0] == start)
        rem.discard(start)
        streets.append(walk(start, j))
    return streets


def ring_nodes(segs, inc, i):
    seen, stack, nodes = {i}, [i], set()
    while stack:
        s = segs[stack.pop()]
        for n in (s["nodes"][0], s["nodes"][-1]):
            nodes.add(n)
            for j in inc[n]:
                if j not in seen:
                    seen.add(j)
                    stack.append(j)
    return nodes


def export_geojson(r, profile):
    """Every way of a profile class (closed ones too), as drawn, split at
    nodes missing from the extract (a MultiLineString when that leaves several
    pieces), with its OSM tags as properties."""
    feats, ways = [], []
    for wid, refs, tags in r.ways:
        if tags["highway"] not in profile["classes"]:
            continue
        ps = pieces(refs, r.loc)
        if not ps:
            continue
        ways.append((wid, refs, tags))
        coords = [[list(r.loc[n]) for n in p] for p in ps]
        geom = ({"type": "LineString", "coordinates": coords[0]} if len(coords) == 1
                else {"type": "MultiLineString", "coordinates": coords})
        props = dict(tags)
        props["osm_id"] = wid
        feats.append({"type": "Feature", "properties": props, "geometry": geom})
    fc = {"type": "FeatureCollection",
          "attribution": "Map data © OpenStreetMap contributors, ODbL 1.0 "
                         "(https://www.openstreetmap.org/copyright)",
          "features": feats}
    return fc, ways


# A small cut for the OSM XML reader (lon_min, lat_min, lon_max, lat_max):
# the ways of the profile's classes with a node in the box, complete (all
# their nodes the extract holds), and every restriction relation.
CUT = (24.938, 60.165, 24.946, 60.170)


def write_cut(r, profile, path):
    x0, y0, x1, y1 = CUT
    inside = lambda n: n in r.loc and x0 <= r.loc[n][0] <= x1 and y0 <= r.loc[n][1] <= y1
    ways = [w for w in r.ways if w[2]["highway"] in profile["classes"] and any(inside(n) for n in w[1])]
    nodes = sorted({n for w in ways for n in w[1] if n in r.loc})
    if os.path.exists(path):
        os.remove(path)
    wr = osmium.SimpleWriter(path)
    for n in nodes:
        wr.add_node(osmium.osm.mutable.Node(id=n, location=osmium.osm.Location(*r.loc[n])))
    for wid, refs, tags in sorted(ways):
        wr.add_way(osmium.osm.mutable.Way(id=wid, nodes=refs, tags=tags))
    for rid, (members, tags) in sorted(r.rels_full):
        wr.add_relation(osmium.osm.mutable.Relation(id=rid, members=members, tags=tags))
    wr.close()
    with open(path, encoding="utf-8") as f:
        text = f.read()
    head, rest = text.split("\n", 1)
    with open(path, "w", encoding="utf-8") as f:
        f.write(head + "\n<!-- Map data © OpenStreetMap contributors, ODbL 1.0 "
                "(https://www.openstreetmap.org/copyright); cut by scripts/osm_reference.py -->\n" + rest)
    return ways


def write_no_highways(path):
    """Three nodes and a building: a valid PBF without streets."""
    if os.path.exists(path):
        os.remove(path)
    wr = osmium.SimpleWriter(path)
    pts = [(24.9400, 60.1650), (24.9410, 60.1650), (24.9410, 60.1655)]
    for i, p in enumerate(pts, 1):
        wr.add_node(osmium.osm.mutable.Node(id=i, location=osmium.osm.Location(*p)))
    wr.add_way(osmium.osm.mutable.Way(id=1, nodes=[1, 2, 3, 1], tags={"building": "yes"}))
    wr.close()


def main():
    pbf = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, "..", "shared", "osm", "helsinki.osm.pbf")
    with open(os.path.join(ROOT, "src", "map", "profiles", "refuse.toml"), "rb") as f:
        profile = tomllib.load(f)
    r = Reader()
    r.apply_file(pbf)
    full, streets = build(r.ways, r.rels, r.loc, profile)
    # A few streets to compare lengths with: the longest ones.
    named = sorted((s for s in streets if s["nodes"][0] != s["nodes"][-1]),
                   key=lambda s: -s["length"])[:6]
    samples = [dict(from_node=s["nodes"][0], to_node=s["nodes"][-1], first_way=s["ways"][0],
                    length_m=s["length"], nodes=len(s["nodes"])) for s in named]
    fc, exported = export_geojson(r, profile)
    # GeoJSON joins lines by location: no two street nodes may share one.
    used = {n for w in exported if accepted(w[2], profile) for n in w[1] if n in r.loc}
    assert len({r.loc[n] for n in used}) == len(used)
    out = dict(
        source="helsinki.osm.pbf (see ../shared/osm/README.md)",
        attribution="Map data © OpenStreetMap contributors, ODbL 1.0",
        libraries={"osmium": version("osmium"), "networkx": nx.__version__,
                   "geographiclib": version("geographiclib"),
                   "python": sys.version.split()[0]},
        profile="src/map/profiles/refuse.toml",
        full=full,
        samples=samples,
        geojson_features=len(fc["features"]),
    )
    d = os.path.join(ROOT, "tests", "fixtures", "osm")
    os.makedirs(d, exist_ok=True)
    cut_ways = write_cut(r, profile, os.path.join(d, "helsinki_cut.osm"))
    cut, _ = build(cut_ways, r.rels, r.loc, profile)
    out["cut"] = dict(bbox=list(CUT), ways=len(cut_ways), **cut)
    write_no_highways(os.path.join(d, "no_highways.osm.pbf"))
    with open(os.path.join(d, "helsinki_reference.json"), "w") as f:
        json.dump(out, f, indent=2)
        f.write("\n")
    with open(os.path.join(d, "helsinki_streets.geojson"), "w") as f:
        json.dump(fc, f, separators=(",", ":"), ensure_ascii=False)
        f.write("\n")
    print(json.dumps(out, indent=2))


if __name__ == "__main__":
    main()
