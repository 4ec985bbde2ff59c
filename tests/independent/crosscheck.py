#!/usr/bin/python3
"""Independent cross-check of sedgrade's reduction.

For each test record given, reads the record itself (its own small parser, not sedgrade's) and the
files sedgrade wrote (<id>.points.csv, <id>.summary.csv) and recomputes, from the published formulas
and an independent water-property library (Debian's python3-iapws: IAPWS-95 density and the IAPWS 2008
viscosity), every sedimentation point's diameter and percent finer, and the D-values and size
fractions by semi-log interpolation on the points sedgrade put on the curve.

Tolerances (the acceptance limits of the project's issues): diameter 0.2 %, percent finer 0.1
percentage point, D-values 0.5 %, fractions 0.1 percentage point.

Instrument constants that come from the calibration register (effective depth, blank) are taken from
the points file for records that name register instruments; for records with inline constants the
effective depth and blank are recomputed too.

usage: crosscheck.py OUT_DIR RECORD.csv...   (exit 0 when everything agrees, 1 otherwise)
"""
import csv
import math
import sys

from iapws import IAPWS95
from iapws._iapws import _Viscosity

G = 9.80665


def water(temp_c):
    w = IAPWS95(T=temp_c + 273.15, P=0.101325)
    return w.rho, _Viscosity(w.rho, temp_c + 273.15)


def number(text, decimal_comma):
    text = text.strip()
    if decimal_comma:
        text = text.replace(",", ".")
    return float(text)


def read_record(path):
    raw = open(path, "rb").read().decode("utf-8-sig")
    lines = [l for l in raw.splitlines() if l.strip() and not l.lstrip().startswith("#")]
    sep = ";" if lines and ";" in lines[0].split(",")[0] else ","
    rec = {"test": {}, "sieve": [], "fine_sieve": [], "reading": [], "pipette": []}
    for fields in csv.reader(lines, delimiter=sep):
        kind = fields[0].strip()
        if kind == "test":
            rec["test"][fields[1].strip()] = [f.strip() for f in fields[2:]]
        else:
            rec[kind].append([f.strip() for f in fields[1:]])
    rec["comma"] = sep == ";"
    return rec


def tnum(rec, key, default=None):
    if key not in rec["test"]:
        return default
    return number(rec["test"][key][0], rec["comma"])


def semilog_d(pts, p):
    """Size at which p % is finer: scan from the coarse end, first segment with P_fine < p <= P_coarse."""
    for (d1, p1), (d2, p2) in zip(pts, pts[1:]):  # pts coarse -> fine
        if p2 < p <= p1:
            x = math.log10(d2) + (p - p2) * (math.log10(d1) - math.log10(d2)) / (p1 - p2)
            return 10 ** x
    return None


def semilog_p(pts, d):
    if pts[0][0] < d:
        return 100.0 if abs(pts[0][1] - 100.0) < 1e-9 else None
    if d < pts[-1][0]:
        return 0.0 if abs(pts[-1][1]) < 1e-9 else None
    for (d1, p1), (d2, p2) in zip(pts, pts[1:]):
        if d2 <= d <= d1:
            if d1 == d2:
                return p1
            f = (math.log10(d) - math.log10(d2)) / (math.log10(d1) - math.log10(d2))
            return p2 + f * (p1 - p2)
    return None


def check(out_dir, path):
    rec = read_record(path)
    tid = rec["test"]["id"][0]
    problems = []
    pts = list(csv.DictReader(open(f"{out_dir}/{tid}.points.csv")))
    summary = {r["quantity"]: r for r in csv.DictReader(open(f"{out_dir}/{tid}.summary.csv"))}
    gs = tnum(rec, "particle_density_mg_m3")
    m = tnum(rec, "specimen_dry_mass_g")
    vol = tnum(rec, "suspension_volume_ml", 1000.0)
    std = rec["test"].get("standard", [""])[0]
    inline = not any(k in rec["test"] for k in ("hydrometer", "pipette_id", "thermometer"))
    # percent passing the split sieve, from the record's own sieve rows
    split = 100.0
    if rec["sieve"]:
        mass = tnum(rec, "sample_dry_mass_g")
        cut = tnum(rec, "split_aperture_mm")
        ret = sum(number(r[1], rec["comma"]) for r in rec["sieve"]
                  if r[0] != "pan" and number(r[0], rec["comma"]) >= cut)
        split = 100.0 * (mass - ret) / mass

    def drho(temp_c, rho_w):
        if std == "bs1377-2":
            return gs * 1000 - 1000.0
        if std == "astm-d7928":
            return rho_w * (gs - 1)
        return gs * 1000 - rho_w

    sed = [p for p in pts if p["source"] in ("hydrometer", "pipette")]
    rows = rec["reading"] if rec["reading"] else rec["pipette"]
    if len(sed) != len(rows):
        problems.append(f"{len(sed)} sedimentation points for {len(rows)} rows")
    for p, row in zip(sed, rows):
        t_min = number(row[0], rec["comma"])
        temp = float(p["temp_c"])
        if inline and abs(temp - number(row[2] if p["source"] == "hydrometer" else row[1], rec["comma"])) > 1e-9:
            problems.append(f"line {p['line']}: temperature changed without a thermometer calibration")
        rho_w, mu = water(temp)
        if p["source"] == "hydrometer":
            r = number(row[1], rec["comma"])
            if inline:
                c0, c1 = (number(v, rec["comma"]) for v in rec["test"]["depth_line_mm"][:2])
                cm = tnum(rec, "meniscus_correction", 0.0)
                h = c0 + c1 * (r + cm)
                blank = number(row[3], rec["comma"]) if len(row) > 3 else tnum(rec, "composite_correction")
            else:
                h = float(p["effective_depth_mm"])
                blank = float(p["blank_reading"])
            if rec["test"]["reading_scale"][0] == "g_per_l":
                a = 1.65 * gs / (2.65 * (gs - 1))
            else:
                a = gs / (gs - 1)
            p_spec = 100 * (r - blank) * a * (vol / 1000) / m
        else:
            h = number(row[2], rec["comma"])
            solids = number(row[3], rec["comma"])
            disp = tnum(rec, "dispersant_mass_g", 0.0)
            vp = tnum(rec, "pipette_volume_ml") if inline else None
            if vp is None and disp > 0:
                # register pipette volume, backed out of the net solids: net = solids - disp Vp / V
                vp = vol * (solids - float(p["net_solids_g"])) / disp
            if vp is None:
                problems.append(f"line {p['line']}: pipette volume not recoverable; percent not checked")
                vp = float("nan")
            p_spec = 100 * (solids - disp * vp / vol) * (vol / vp) / m
        d_mm = math.sqrt(18 * mu * (h / 1000) / (drho(temp, rho_w) * G * t_min * 60)) * 1000
        got_d, got_p = float(p["diameter_mm"]), float(p["percent_finer"])
        if abs(got_d / d_mm - 1) > 0.002:
            problems.append(f"line {p['line']}: diameter {got_d} mm, independent {d_mm:.6g} mm")
        if abs(got_p - p_spec * split / 100) > 0.1:
            problems.append(f"line {p['line']}: percent finer {got_p}, independent {p_spec * split / 100:.6g}")
    # the curve: semi-log interpolation on the points sedgrade put on the curve
    on = sorted({(float(p["diameter_mm"]), float(p["percent_finer"])) for p in pts if p["on_curve"] == "yes"},
                key=lambda x: -x[0])
    merged = []
    for d, pf in on:
        if merged and merged[-1][0] == d:
            continue
        merged.append((d, pf))
    for x in (10, 15, 30, 50, 60, 85):
        want = semilog_d(merged, x)
        got = summary[f"d{x}_mm"]["value"]
        if want is None and got != "":
            problems.append(f"d{x}_mm {got}: independent says not determined")
        elif want is not None and (got == "" or abs(float(got) / want - 1) > 0.005):
            problems.append(f"d{x}_mm {got or 'empty'}, independent {want:.6g}")
    bounds = {"clay_pct": (None, 0.002), "silt_pct": (0.002, 0.063), "sand_pct": (0.063, 2.0),
              "gravel_pct": (2.0, 63.0), "fines_pct": (None, 0.075)}
    for name, (lo, hi) in bounds.items():
        p_hi = semilog_p(merged, hi)
        p_lo = 0.0 if lo is None else semilog_p(merged, lo)
        got = summary[name]["value"]
        if p_hi is None or p_lo is None:
            if got != "":
                problems.append(f"{name} {got}: independent says not determined")
            continue
        if got == "" or abs(float(got) - (p_hi - p_lo)) > 0.1:
            problems.append(f"{name} {got or 'empty'}, independent {p_hi - p_lo:.6g}")
    return tid, problems


def main():
    out_dir, records = sys.argv[1], sys.argv[2:]
    bad = 0
    for path in records:
        tid, problems = check(out_dir, path)
        if problems:
            bad += 1
            print(f"crosscheck {tid}: {len(problems)} disagreement(s)")
            for p in problems:
                print("  " + p)
        else:
            print(f"crosscheck {tid}: agrees")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
