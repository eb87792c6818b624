#!/usr/bin/env python3
"""Convert Natural Earth land (TopoJSON) into Shelfwind's compact land file.

Usage:

    python3 assets/tools/convert_land.py path/to/land-50m.json assets/land-50m.bin

The input is `land-50m.json` from the npm package `world-atlas@2.0.2` (Natural Earth
4.1.0 land, 1:50m; get it with `npm pack world-atlas@2.0.2` and unpack the tarball).
Its `land` object is a GeometryCollection of Polygon and MultiPolygon geometries whose
rings are lists of arc indices into quantized, delta-encoded arcs; an index `~i` (that
is, `-i - 1`) means arc `i` walked backwards.

The output format is described in `assets/README.md`:

    magic   8 bytes  b"SWLAND01"
    u32 LE           number of rings
    per ring:
        u32 LE       point count n (n >= 3; the closing point is not repeated)
        n points     lon then lat, each a zigzag-encoded LEB128 varint holding the
                     difference from the previous point of the same ring, in units of
                     1e-5 degree; the first point of each ring is a difference from (0, 0)

Every ring is written, outer rings and holes alike: the reader uses the even-odd rule,
so the winding order does not matter.

The TopoJSON is spherical and the output is planar in longitude and latitude, so rings
that step across the antimeridian are cut there into pieces within -180..180, the ring
that goes around the South Pole (Antarctica) is closed along latitude -90, and rings
that enclose no area in the plane are dropped (see `planar_rings`).

Prints the counts of rings, points and bytes written. Python 3 standard library only.
"""

import json
import struct
import sys

MAGIC = b"SWLAND01"
UNITS_PER_DEGREE = 100_000
HALF_TURN = 180 * UNITS_PER_DEGREE
FULL_TURN = 360 * UNITS_PER_DEGREE


def decode_arcs(topology):
    """Absolute [lon, lat] positions of every arc, undoing quantization and deltas."""
    transform = topology.get("transform")
    arcs = []
    for arc in topology["arcs"]:
        if transform is None:
            arcs.append([(float(p[0]), float(p[1])) for p in arc])
            continue
        (sx, sy), (tx, ty) = transform["scale"], transform["translate"]
        x = y = 0
        points = []
        for p in arc:
            x += p[0]
            y += p[1]
            points.append((x * sx + tx, y * sy + ty))
        arcs.append(points)
    return arcs


def ring_positions(ring, arcs):
    """Stitch a ring's arcs together; each arc after the first repeats the previous
    arc's last point, which is dropped."""
    out = []
    for index in ring:
        arc = arcs[index] if index >= 0 else arcs[~index][::-1]
        out.extend(arc if not out else arc[1:])
    return out


def polygons(geometry):
    """The polygons (lists of rings of arc indices) of one geometry."""
    kind = geometry.get("type")
    if kind == "Polygon":
        return [geometry["arcs"]]
    if kind == "MultiPolygon":
        return geometry["arcs"]
    if kind == "GeometryCollection":
        return [p for g in geometry["geometries"] for p in polygons(g)]
    if kind is None:
        return []
    raise ValueError(f"unexpected geometry type {kind!r}")


def to_units(positions):
    """Round to 1e-5 degree, clamp latitude to the valid range (longitude is handled by
    `planar_rings`), drop repeated consecutive points and the closing point."""
    out = []
    for lon, lat in positions:
        q = (
            round(lon * UNITS_PER_DEGREE),
            max(-90 * UNITS_PER_DEGREE, min(90 * UNITS_PER_DEGREE, round(lat * UNITS_PER_DEGREE))),
        )
        if not out or out[-1] != q:
            out.append(q)
    while len(out) > 1 and out[-1] == out[0]:
        out.pop()
    return out


def unwrap(ring):
    """Make longitudes continuous (each step at most half a turn) and return the ring
    with the net number of turns it makes around the pole (0 for ordinary rings)."""
    out = [ring[0]]
    for x, y in ring[1:]:
        px = out[-1][0]
        dx = (x - px + HALF_TURN) % FULL_TURN - HALF_TURN
        out.append((px + dx, y))
    x0 = ring[0][0]
    lx = out[-1][0]
    closing = (x0 - lx + HALF_TURN) % FULL_TURN - HALF_TURN
    turns = round((lx + closing - x0) / FULL_TURN)
    return out, turns


def clip(ring, bound, keep_west):
    """Sutherland-Hodgman clip of a ring to the side of the meridian `x = bound` that
    is kept: west of it (x <= bound) when `keep_west`, else east of it. Where a concave
    ring leaves and re-enters, the result runs along the cut line and back; such
    doubled edges cancel under the even-odd rule."""
    inside = (lambda x: x <= bound) if keep_west else (lambda x: x >= bound)
    out = []
    for i in range(len(ring)):
        a, b = ring[i - 1], ring[i]
        a_in, b_in = inside(a[0]), inside(b[0])
        if a_in != b_in:
            t = (bound - a[0]) / (b[0] - a[0])
            out.append((bound, round(a[1] + t * (b[1] - a[1]))))
        if b_in:
            out.append(b)
    return out


def tidy(ring):
    """Drop repeated consecutive points and the closing point; None when fewer than 3
    distinct points or no area is left."""
    out = []
    for p in ring:
        if not out or out[-1] != p:
            out.append(p)
    while len(out) > 1 and out[-1] == out[0]:
        out.pop()
    if len(out) < 3:
        return None
    area2 = sum(out[i - 1][0] * out[i][1] - out[i][0] * out[i - 1][1] for i in range(len(out)))
    return out if area2 != 0 else None


def planar_rings(ring):
    """Rings in the plane of longitude and latitude, longitudes in -180..180.

    The TopoJSON is spherical: a ring may step across the antimeridian (from 179.9 to
    -179.9), and Antarctica's coast goes once around the south pole. In the plane a
    ring that crosses the antimeridian is cut there into pieces, each shifted into
    -180..180; a ring around a pole is first closed along the pole's latitude line.
    """
    if len({y for _, y in ring}) == 1:
        # A ring along one latitude (the TopoJSON has one along 89.999 S that closes
        # Antarctica around the pole on the sphere) encloses nothing in the plane.
        return []
    ring, turns = unwrap(ring)
    if turns:
        mean_lat = sum(y for _, y in ring) / len(ring)
        pole = -90 * UNITS_PER_DEGREE if mean_lat < 0 else 90 * UNITS_PER_DEGREE
        x0, y0 = ring[0]
        end = x0 + turns * FULL_TURN
        ring = ring + [(end, y0), (end, pole), (x0, pole)]
    lo = min(x for x, _ in ring)
    hi = max(x for x, _ in ring)
    out = []
    k = (lo + HALF_TURN) // FULL_TURN
    while k * FULL_TURN - HALF_TURN < hi:
        west, east = k * FULL_TURN - HALF_TURN, k * FULL_TURN + HALF_TURN
        piece = ring
        if lo < west:
            piece = clip(piece, west, keep_west=False)
        if hi > east:
            piece = clip(piece, east, keep_west=True)
        piece = tidy([(x - k * FULL_TURN, y) for x, y in piece])
        if piece:
            out.append(piece)
        k += 1
    return out


def varint(value):
    """Zigzag-encode a signed integer and write it as LEB128."""
    z = (value << 1) if value >= 0 else ((-value << 1) - 1)
    out = bytearray()
    while True:
        byte = z & 0x7F
        z >>= 7
        if z:
            out.append(byte | 0x80)
        else:
            out.append(byte)
            return bytes(out)


def main(argv):
    if len(argv) != 3:
        sys.exit(f"usage: {argv[0]} path/to/land-50m.json assets/land-50m.bin")
    with open(argv[1], encoding="utf-8") as f:
        topology = json.load(f)
    if topology.get("type") != "Topology" or "land" not in topology.get("objects", {}):
        sys.exit(f"{argv[1]}: not a TopoJSON topology with a `land` object")
    arcs = decode_arcs(topology)

    rings = []
    dropped = 0
    for polygon in polygons(topology["objects"]["land"]):
        for ring in polygon:
            points = to_units(ring_positions(ring, arcs))
            pieces = planar_rings(points) if len(points) >= 3 else []
            if pieces:
                rings.extend(pieces)
            else:
                dropped += 1

    body = bytearray(MAGIC)
    body += struct.pack("<I", len(rings))
    for ring in rings:
        body += struct.pack("<I", len(ring))
        px = py = 0
        for x, y in ring:
            body += varint(x - px)
            body += varint(y - py)
            px, py = x, y
    with open(argv[2], "wb") as f:
        f.write(body)

    points = sum(len(r) for r in rings)
    print(f"rings: {len(rings)}")
    print(f"points: {points}")
    print(f"bytes: {len(body)}")
    if dropped:
        print(f"rings dropped (no area in the plane): {dropped}")


if __name__ == "__main__":
    main(sys.argv)
