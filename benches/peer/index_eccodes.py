"""The peer of `cargo bench --bench index_peer`: the upwelling index table that
`shelfwind index --coast COAST --wind GRIB2` writes, computed by a short script with
ecCodes and numpy, as a careful user would write it without Shelfwind.

    python index_eccodes.py index COAST.geojson WIND.grib2 OUT.csv
    python index_eccodes.py repack IN.grib2 OUT.grib2 PACKING  # grid_simple (5.0),
        # grid_complex_spatial_differencing (5.3, order 2) or grid_ccsds (5.42)
    python index_eccodes.py decode WIND.grib2           # decode every message, print seconds

Set up (PyPI): python3 -m venv benches/peer/.venv &&
benches/peer/.venv/bin/pip install eccodes numpy   (ecCodes 2.50 and numpy 2.4 were used)

The same published formulas as Shelfwind (README "Science"): wind stress
tau = rho_air C_D |U| U with C_D = 1.3e-3 and rho_air = 1.22 kg/m^3; Ekman transport
M = (tau_y, -tau_x) / (rho_water f), f = 2 Omega sin(lat), rho_water = 1025 kg/m^3;
the coastal upwelling index UI = 100 (M_x sin b + M_y cos b) with b the offshore normal
(Bakun 1973). Segments of two points only: the index at the great-circle midpoint, the
offshore normal 90 degrees to the sea side of the bearing from the midpoint to the end.
The wind is interpolated bilinearly between the four grid points around the midpoint of a
regular latitude/longitude grid (template 3.0) that covers it.
"""
import json
import sys
import time
from datetime import datetime, timedelta, timezone

import eccodes as ec
import numpy as np

RHO_AIR, RHO_WATER, CD, OMEGA = 1.22, 1025.0, 1.3e-3, 7.292115e-5


def read_segments(path):
    ids, lat, lon, sea = [], [], [], []
    for f in json.load(open(path))["features"]:
        (lon_a, lat_a), (lon_b, lat_b) = f["geometry"]["coordinates"]
        ids.append(f["properties"]["id"])
        lat.append((lat_a, lat_b))
        lon.append((lon_a, lon_b))
        sea.append(f["properties"]["sea"])
    return ids, np.radians(lat), np.radians(lon), np.array([s == "right" for s in sea])


def geometry(lat, lon, right):
    """Great-circle midpoints (mean of unit vectors) and the offshore bearings there."""
    x = np.cos(lat) * np.cos(lon)
    y = np.cos(lat) * np.sin(lon)
    z = np.sin(lat)
    mx, my, mz = x.sum(1), y.sum(1), z.sum(1)
    mlat = np.arctan2(mz, np.hypot(mx, my))
    mlon = np.arctan2(my, mx)
    lat_b, dlon = lat[:, 1], lon[:, 1] - mlon
    along = np.degrees(
        np.arctan2(
            np.sin(dlon) * np.cos(lat_b),
            np.cos(mlat) * np.sin(lat_b) - np.sin(mlat) * np.cos(lat_b) * np.cos(dlon),
        )
    )
    offshore = np.where(right, along + 90.0, along - 90.0) % 360.0
    return np.degrees(mlat), np.degrees(mlon), offshore


def read_wind(path, mlat, mlon):
    """u and v at the midpoints at each valid time: {time: [u, v]}."""
    fields = {}
    weights = None
    with open(path, "rb") as f:
        while True:
            h = ec.codes_grib_new_from_file(f)
            if h is None:
                break
            try:
                number = ec.codes_get(h, "parameterNumber")
                if ec.codes_get(h, "discipline") != 0 or number not in (2, 3):
                    continue
                if weights is None:
                    ni, nj = ec.codes_get(h, "Ni"), ec.codes_get(h, "Nj")
                    la1 = ec.codes_get(h, "latitudeOfFirstGridPointInDegrees")
                    lo1 = ec.codes_get(h, "longitudeOfFirstGridPointInDegrees")
                    di = ec.codes_get(h, "iDirectionIncrementInDegrees")
                    dj = ec.codes_get(h, "jDirectionIncrementInDegrees")
                    col = ((mlon - lo1) % 360.0) / di
                    row = (la1 - mlat) / dj
                    i0 = np.minimum(np.floor(col).astype(int), ni - 2)
                    j0 = np.minimum(np.floor(row).astype(int), nj - 2)
                    tx, ty = col - i0, row - j0
                    corners = [j0 * ni + i0, j0 * ni + i0 + 1, (j0 + 1) * ni + i0, (j0 + 1) * ni + i0 + 1]
                    weights = (corners, [(1 - tx) * (1 - ty), tx * (1 - ty), (1 - tx) * ty, tx * ty])
                values = ec.codes_get_values(h)
                at = sum(values[c] * w for c, w in zip(*weights))
                valid = datetime.strptime(
                    "%08d%04d" % (ec.codes_get(h, "validityDate"), ec.codes_get(h, "validityTime")),
                    "%Y%m%d%H%M",
                ).replace(tzinfo=timezone.utc)
                fields.setdefault(valid, [None, None])[number - 2] = at
            finally:
                ec.codes_release(h)
    return fields


def fixed(x, decimals):
    """As Shelfwind prints: rounded, trailing zeros dropped, never -0."""
    text = "%.*f" % (decimals, x)
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def index(coast, grib, out):
    ids, lat, lon, right = read_segments(coast)
    mlat, mlon, offshore = geometry(lat, lon, right)
    wind = read_wind(grib, mlat, mlon)
    times = sorted(wind)
    u = np.array([wind[t][0] for t in times])  # times x segments
    v = np.array([wind[t][1] for t in times])
    speed = np.hypot(u, v)
    k = RHO_AIR * CD * speed
    f = 2.0 * OMEGA * np.sin(np.radians(mlat))
    mx, my = k * v / (RHO_WATER * f), -k * u / (RHO_WATER * f)
    beta = np.radians(offshore)
    ui = 100.0 * (mx * np.sin(beta) + my * np.cos(beta))
    direction = np.degrees(np.arctan2(-u, -v)) % 360.0
    stamps = [t.strftime("%Y-%m-%dT%H:%M:%SZ") for t in times]
    near = np.abs(mlat) < 10.0
    with open(out, "w") as w:
        w.write("segment_id,time_utc,lat,lon,wind_speed_ms,wind_from_deg,upwelling_index_m3s_per_100m,flag\n")
        for s in sorted(range(len(ids)), key=lambda s: ids[s]):
            head = "%s," % ids[s]
            place = ",%s,%s," % (fixed(mlat[s], 6), fixed(mlon[s], 6))
            flag = ",near-equator\n" if near[s] else ",\n"
            for t, stamp in enumerate(stamps):
                d = "" if speed[t, s] < 1e-9 else fixed(round(direction[t, s], 2) % 360.0, 2)
                w.write(head + stamp + place + fixed(speed[t, s], 3) + "," + d + "," + fixed(ui[t, s], 3) + flag)


def repack(src, dst, packing):
    with open(src, "rb") as f, open(dst, "wb") as o:
        while True:
            h = ec.codes_grib_new_from_file(f)
            if h is None:
                break
            values = ec.codes_get_values(h)
            ec.codes_set(h, "packingType", packing)
            if packing == "grid_complex_spatial_differencing":
                ec.codes_set(h, "orderOfSpatialDifferencing", 2)
            ec.codes_set_values(h, values)
            ec.codes_write(h, o)
            ec.codes_release(h)


def decode(path):
    start = time.perf_counter()
    total = 0
    with open(path, "rb") as f:
        while True:
            h = ec.codes_grib_new_from_file(f)
            if h is None:
                break
            total += len(ec.codes_get_values(h))
            ec.codes_release(h)
    print("%.6f %d" % (time.perf_counter() - start, total))


if __name__ == "__main__":
    {"index": index, "repack": repack, "decode": decode}[sys.argv[1]](*sys.argv[2:])
