#!/usr/bin/env python3
"""Tabulates criterion medians (markdown) and fits the growth exponent per group.

Usage: python3 benches/medians.py [CRITERION_DIR]   (default: $CARGO_TARGET_DIR/criterion
or target/criterion). For each group, the points with a numeric last id component are the
size ladder; the slope of log(median) against log(size) is the observed exponent.
"""
import json, math, os, sys

root = sys.argv[1] if len(sys.argv) > 1 else os.path.join(
    os.environ.get("CARGO_TARGET_DIR", "target"), "criterion")
rows = []
for dirpath, dirs, files in os.walk(root):
    if os.path.basename(dirpath) == "new" and "estimates.json" in files:
        bench = json.load(open(os.path.join(dirpath, "benchmark.json")))
        est = json.load(open(os.path.join(dirpath, "estimates.json")))
        rows.append((bench["group_id"], bench.get("function_id") or "",
                     bench.get("value_str") or "", est["median"]["point_estimate"]))

def fmt(ns):
    for unit, f in (("s", 1e9), ("ms", 1e6), ("µs", 1e3)):
        if ns >= f:
            return f"{ns / f:.3g} {unit}"
    return f"{ns:.3g} ns"

def size(v):
    try:
        return float(v)
    except ValueError:
        return None

series = {}
for g, f, v, m in sorted(rows, key=lambda r: (r[0], r[1], size(r[2]) or 0, r[2])):
    series.setdefault((g, f), []).append((v, m))
print("| group | series | size: median |  exponent |")
print("| --- | --- | --- | --- |")
for (g, f), pts in series.items():
    cells = ", ".join(f"{v}: {fmt(m)}" for v, m in pts)
    xy = [(math.log(size(v)), math.log(m)) for v, m in pts if size(v)]
    slope = ""
    if len(xy) >= 3:
        n = len(xy)
        mx = sum(x for x, _ in xy) / n
        my = sum(y for _, y in xy) / n
        sxx = sum((x - mx) ** 2 for x, _ in xy)
        if sxx > 0:
            slope = f"{sum((x - mx) * (y - my) for x, y in xy) / sxx:.2f}"
    print(f"| {g} | {f} | {cells} | {slope} |")
