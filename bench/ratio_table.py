#!/usr/bin/env python3
"""Prints a ratio table from one run of lob_bench (Google Benchmark JSON).

Benchmarks are named "<group>/<variant>". Per group, every variant's time per call, its
"max_rel_err" counter (if any) and its time relative to the group's base variant: the one
named "lob", else the first whose name starts with "lob". Groups without such a variant are
listed without ratios. Standard library only.

    lob_bench --benchmark_format=json > run.json && python3 bench/ratio_table.py run.json
    lob_bench --benchmark_out=run.json --benchmark_out_format=json; python3 bench/ratio_table.py run.json
    lob_bench --benchmark_format=json | python3 bench/ratio_table.py

With --benchmark_repetitions, the "median" aggregate is used when present.
Option --time=cpu (default) or --time=real picks the time column.
"""
import json
import sys
from collections import OrderedDict

UNIT_NS = {"ns": 1.0, "us": 1e3, "ms": 1e6, "s": 1e9}


def load(stream):
    text = stream.read()
    # The JSON may follow console output when stdout and the report were mixed.
    start = text.find("{")
    return json.loads(text[start:])


def rows(report, time_key):
    """(group, variant, ns_per_call, max_rel_err) per benchmark, medians preferred."""
    plain, medians = OrderedDict(), OrderedDict()
    for b in report.get("benchmarks", []):
        name = b.get("run_name", b["name"])
        if "/" not in name:
            continue
        kind = b.get("run_type", "iteration")
        if kind == "aggregate" and b.get("aggregate_name") != "median":
            continue
        ns = float(b[time_key]) * UNIT_NS.get(b.get("time_unit", "ns"), 1.0)
        err = b.get("max_rel_err")
        target = medians if kind == "aggregate" else plain
        if name not in target:  # first repetition only, when no aggregate exists
            target[name] = (ns, err)
    chosen = OrderedDict(plain)
    chosen.update(medians)
    out = OrderedDict()
    for name, (ns, err) in chosen.items():
        group, variant = name.split("/", 1)
        out.setdefault(group, []).append((variant, ns, err))
    return out


def base_of(variants):
    for v in variants:
        if v[0] == "lob":
            return v
    for v in variants:
        if v[0].startswith("lob"):
            return v
    return None


def fmt_err(err):
    return "-" if err is None else "%.2e" % err


def main(argv):
    time_key = "cpu_time"
    paths = []
    for a in argv[1:]:
        if a.startswith("--time="):
            time_key = "real_time" if a.split("=", 1)[1] == "real" else "cpu_time"
        else:
            paths.append(a)
    if paths:
        with open(paths[0]) as f:
            report = load(f)
    else:
        report = load(sys.stdin)
    groups = rows(report, time_key)
    width = max([len(v[0]) for vs in groups.values() for v in vs] + [7])
    print("time: %s per call; ratio = time / time of the group's lob variant" % time_key.replace("_", " "))
    for group, variants in groups.items():
        base = base_of(variants)
        print()
        print(group)
        print("  %-*s %12s %12s %10s" % (width, "variant", "ns/call", "max_rel_err", "ratio"))
        for variant, ns, err in variants:
            ratio = "%.2f" % (ns / base[1]) if base and base[1] > 0 else "-"
            print("  %-*s %12.1f %12s %10s" % (width, variant, ns, fmt_err(err), ratio))


if __name__ == "__main__":
    main(sys.argv)
