#!/usr/bin/env python3
"""Writes the open-data demo: an invented town block, Saltmarsh Row, in GeoJSON, CityJSON
2.0 and CityJSONSeq, set on an invented spot in the open Atlantic (45 N, 30 W) so that no
real place is copied. Plain Python, no packages: run `python3 scripts/opendata_demo.py`
from the repository root; it rewrites scenes/opendata/.

Plan metres are turned into longitude and latitude with the local radii of curvature of
WGS84 (good to a millimetre over this block), and into UTM zone 26N (EPSG:32626) eastings
and northings for CityJSON with the transverse-Mercator series of Snyder, "Map Projections:
A Working Manual" (USGS PP 1395, 1987), eqs. 8-9 to 8-13, from memory; pansite reads the
grid back with proj4rs, so the two only need to agree closely, not exactly.
"""
import json
import math
import os

LAT0, LON0 = 45.0, -30.0
A, F = 6378137.0, 1 / 298.257223563
E2 = F * (2 - F)


def to_lonlat(x, y):
    s = math.sin(math.radians(LAT0))
    w = 1 - E2 * s * s
    m = A * (1 - E2) / w ** 1.5
    n = A / math.sqrt(w)
    lat = LAT0 + math.degrees(y / m)
    lon = LON0 + math.degrees(x / (n * math.cos(math.radians(LAT0))))
    return [round(lon, 9), round(lat, 9)]


def utm(lon, lat, zone=26):
    k0, lon0 = 0.9996, math.radians(-183 + 6 * zone)
    phi, lam = math.radians(lat), math.radians(lon)
    ep2 = E2 / (1 - E2)
    n = A / math.sqrt(1 - E2 * math.sin(phi) ** 2)
    t = math.tan(phi) ** 2
    c = ep2 * math.cos(phi) ** 2
    a = math.cos(phi) * (lam - lon0)
    m = A * ((1 - E2 / 4 - 3 * E2 ** 2 / 64 - 5 * E2 ** 3 / 256) * phi
             - (3 * E2 / 8 + 3 * E2 ** 2 / 32 + 45 * E2 ** 3 / 1024) * math.sin(2 * phi)
             + (15 * E2 ** 2 / 256 + 45 * E2 ** 3 / 1024) * math.sin(4 * phi)
             - (35 * E2 ** 3 / 3072) * math.sin(6 * phi))
    x = k0 * n * (a + (1 - t + c) * a ** 3 / 6
                  + (5 - 18 * t + t * t + 72 * c - 58 * ep2) * a ** 5 / 120) + 500000
    y = k0 * (m + n * math.tan(phi) * (a * a / 2 + (5 - t + 9 * c + 4 * c * c) * a ** 4 / 24
                                        + (61 - 58 * t + t * t + 600 * c - 330 * ep2) * a ** 6 / 720))
    return x, y


def rect(x, y, w, d):
    return [(x, y), (x + w, y), (x + w, y + d), (x, y + d)]


# The block: (name, plan outline, tags). x east, y north, metres from the square's middle.
BUILDINGS = [
    ("Ropewalk Hall", rect(-30, 12, 24, 10), {"height": "14", "roof:shape": "gabled", "roof:height": "5"}),
    ("Tidemill House", rect(-4, 12, 12, 10), {"building:levels": "3", "roof:shape": "hipped", "roof:levels": "1"}),
    ("Net Loft", rect(10, 12, 8, 14), {"building:levels": "2", "roof:shape": "skillion", "roof:direction": "S", "roof:height": "2"}),
    ("Chandlery", rect(20, 12, 10, 10), {"height": "9"}),
    ("Beacon Store", rect(-30, -24, 10, 10), {"height": "12", "roof:shape": "pyramidal", "roof:height": "4"}),
    ("Old Customs", rect(-18, -24, 14, 10), {"height": "10", "roof:shape": "onion"}),
    ("Pilot Cottages", rect(-2, -24, 16, 8), {"roof:shape": "gabled", "roof:orientation": "across"}),
    ("Sail Yard", None, {"height": "8"}),
]
COURTYARD = ([(16, -30), (32, -30), (32, -14), (16, -14)], [(21, -25), (21, -19), (27, -19), (27, -25)])
TOWER_OUTLINE = rect(-30, -6, 10, 10)
TOWER_PARTS = [(rect(-30, -6, 10, 10), {"height": "7"}), (rect(-27, -3, 4, 4), {"min_height": "7", "height": "22", "roof:shape": "pyramidal", "roof:height": "4"})]
STREETS = [
    ("Harbour Lane", [(-40, 4), (0, 4), (40, 4)], {"highway": "residential"}),
    ("Quay Road", [(0, -40), (0, -32), (2, 40)], {"highway": "secondary", "lanes": "2"}),
    ("Ferry Steps", [(36, -40), (36, 0)], {"highway": "footway", "width": "2.5"}),
]


def ring(points):
    r = [to_lonlat(x, y) for x, y in points]
    return r + [r[0]]


def geojson():
    features = []
    for i, (name, outline, tags) in enumerate(BUILDINGS):
        if outline is None:
            outer, hole = COURTYARD
            coords = [ring(outer), ring(hole)]
        else:
            coords = [ring(outline)]
        features.append({"type": "Feature", "id": f"b{i + 1}",
                         "properties": {"building": "yes", "name": name, **tags},
                         "geometry": {"type": "Polygon", "coordinates": coords}})
    features.append({"type": "Feature", "id": "tower",
                     "properties": {"building": "yes", "name": "Lantern Tower"},
                     "geometry": {"type": "Polygon", "coordinates": [ring(TOWER_OUTLINE)]}})
    for k, (outline, tags) in enumerate(TOWER_PARTS):
        features.append({"type": "Feature", "id": f"tower-part-{k + 1}",
                         "properties": {"building:part": "yes", "name": f"Lantern Tower part {k + 1}", **tags},
                         "geometry": {"type": "Polygon", "coordinates": [ring(outline)]}})
    for i, (name, line, tags) in enumerate(STREETS):
        features.append({"type": "Feature", "id": f"s{i + 1}",
                         "properties": {"name": name, **tags},
                         "geometry": {"type": "LineString", "coordinates": [to_lonlat(x, y) for x, y in line]}})
    features.append({"type": "Feature", "id": "well",
                     "properties": {"amenity": "drinking_water"},
                     "geometry": {"type": "Point", "coordinates": to_lonlat(4, -4)}})
    return {"type": "FeatureCollection", "features": features}


SCALE = 0.001


def city_objects():
    """Each building as an LoD2 solid (flat or gabled roof), in UTM 26N grid metres."""
    objects, vertices, index = {}, [], {}
    e0, n0 = utm(LON0, LAT0)
    t = [round(e0 - 100), round(n0 - 100), 0.0]

    def v(x, y, z):
        lon, lat = to_lonlat(x, y)
        e, n = utm(lon, lat)
        key = (round((e - t[0]) / SCALE), round((n - t[1]) / SCALE), round(z / SCALE))
        if key not in index:
            index[key] = len(vertices)
            vertices.append(list(key))
        return index[key]

    for i, (name, outline, tags) in enumerate(BUILDINGS):
        if outline is None:
            continue
        top = float(tags.get("height", 9))
        gabled = tags.get("roof:shape") == "gabled"
        eaves = top - 4 if gabled else top
        (x0, y0), (x1, _), (_, y1), _ = outline
        base = [v(x, y, 0) for x, y in outline]
        up = [v(x, y, eaves) for x, y in outline]
        surfaces = [[base[::-1]]]
        values = [0]
        if gabled:
            ridge = [v(x0, (y0 + y1) / 2, top), v(x1, (y0 + y1) / 2, top)]
            surfaces += [[[up[0], up[1], ridge[1], ridge[0]]], [[up[2], up[3], ridge[0], ridge[1]]]]
            values += [1, 1]
            walls = [[up[0], up[1]], [up[1], up[2]], [up[2], up[3]], [up[3], up[0]]]
            surfaces += [[[base[0], base[1], up[1], up[0]]], [[base[1], base[2], up[2], ridge[1], up[1]]],
                         [[base[2], base[3], up[3], up[2]]], [[base[3], base[0], up[0], ridge[0], up[3]]]]
            values += [2, 2, 2, 2]
            del walls
        else:
            surfaces += [[up]]
            values += [1]
            for k in range(4):
                j = (k + 1) % 4
                surfaces.append([[base[k], base[j], up[j], up[k]]])
                values.append(2)
        lod1 = [[[base[::-1]], [up]] + [[[base[k], base[(k + 1) % 4], up[(k + 1) % 4], up[k]]] for k in range(4)]]
        objects[f"b{i + 1}"] = {
            "type": "Building",
            "attributes": {"name": name},
            "geometry": [
                {"type": "Solid", "lod": "1", "boundaries": lod1},
                {"type": "Solid", "lod": "2.2", "boundaries": [surfaces],
                 "semantics": {"surfaces": [{"type": "GroundSurface"}, {"type": "RoofSurface"}, {"type": "WallSurface"}],
                               "values": [values]}},
            ],
        }
    # The courtyard building: a MultiSurface roof with a hole.
    outer, hole = COURTYARD
    o = [v(x, y, 8) for x, y in outer]
    h = [v(x, y, 8) for x, y in hole[::-1]]
    ob = [v(x, y, 0) for x, y in outer]
    hb = [v(x, y, 0) for x, y in hole[::-1]]
    surfaces = [[o, h]]
    for ring_top, ring_base in ((o, ob), (h, hb)):
        for k in range(4):
            j = (k + 1) % 4
            surfaces.append([[ring_base[k], ring_base[j], ring_top[j], ring_top[k]]])
    objects["b8"] = {"type": "Building", "attributes": {"name": "Sail Yard"},
                     "geometry": [{"type": "MultiSurface", "lod": "2.2", "boundaries": surfaces,
                                   "semantics": {"surfaces": [{"type": "RoofSurface"}, {"type": "WallSurface"}],
                                                 "values": [0] + [1] * 8}}]}
    objects["tree-1"] = {"type": "SolitaryVegetationObject", "geometry": []}
    return objects, vertices, t


def main():
    root = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "scenes", "opendata")
    os.makedirs(root, exist_ok=True)
    with open(os.path.join(root, "saltmarsh-row.geojson"), "w") as f:
        json.dump(geojson(), f, indent=1)
        f.write("\n")
    objects, vertices, t = city_objects()
    header = {"type": "CityJSON", "version": "2.0",
              "transform": {"scale": [SCALE] * 3, "translate": t},
              "metadata": {"referenceSystem": "https://www.opengis.net/def/crs/EPSG/0/32626",
                           "title": "Saltmarsh Row, an invented town block"}}
    with open(os.path.join(root, "saltmarsh-row.city.json"), "w") as f:
        json.dump({**header, "CityObjects": objects, "vertices": vertices}, f)
        f.write("\n")
    with open(os.path.join(root, "saltmarsh-row.city.jsonl"), "w") as f:
        f.write(json.dumps({**header, "CityObjects": {}, "vertices": []}) + "\n")
        for oid, obj in objects.items():
            used = sorted({i for g in obj["geometry"] for i in flatten(g["boundaries"])})
            local = {old: new for new, old in enumerate(used)}
            geoms = [{**g, "boundaries": remap(g["boundaries"], local)} for g in obj["geometry"]]
            feature = {"type": "CityJSONFeature", "id": oid,
                       "CityObjects": {oid: {**obj, "geometry": geoms}},
                       "vertices": [vertices[i] for i in used]}
            f.write(json.dumps(feature) + "\n")


def flatten(b):
    for x in b:
        if isinstance(x, list):
            yield from flatten(x)
        else:
            yield x


def remap(b, local):
    return [remap(x, local) if isinstance(x, list) else local[x] for x in b]


if __name__ == "__main__":
    main()
