"""Warm time of one explorer change: recompute, card HTML and the chart as inline SVG.

Run with ``python benchmarks/bench_explore.py``. Each measured change sets a level (or df, or
effect) not seen before, so the explorer's cache of rendered views is bypassed; one line
also shows a revisit served from that cache. Target: median change <= 100 ms.

Wall-clock medians depend on the machine's load; the CPU column (process time, all threads,
vl-convert's included) is steadier on a shared machine.
"""

from __future__ import annotations

import statistics
import time

import tinfer
from tinfer.display import charts, ttest, widgets

TARGET_MS = 100.0
REPEATS = 15


def _timed(fn, values) -> tuple[float, float]:
    """Median wall and CPU milliseconds of ``fn(v)`` over ``values``."""
    wall, cpu = [], []
    for v in values:
        w0, c0 = time.perf_counter(), time.process_time()
        fn(v)
        wall.append(time.perf_counter() - w0)
        cpu.append(time.process_time() - c0)
    return 1e3 * statistics.median(wall), 1e3 * statistics.median(cpu)


def _set(control):
    def change(v):
        control.value = v

    return change


def main() -> None:
    # Invented summaries: drying times (min) of two glaze mixes.
    r = tinfer.from_summary(n=(14, 16), mean=(41.3, 37.9), sd=(4.4, 5.1))
    ex = widgets.explore_result(r)  # renders once: vl-convert and altair are warm after this
    for v in (0.91, 0.92, 0.93):
        ex.level.value = v
    levels = [0.800 + 0.003 * i for i in range(REPEATS)]
    rows = [("result explorer: level change", *_timed(_set(ex.level), levels))]
    rows.append(("  same, revisiting a level (cache)", *_timed(_set(ex.level), levels)))
    rows.append(
        ("  part: recompute", *_timed(lambda v: r.recompute(level=v), [v + 1e-4 for v in levels]))
    )
    rows.append(
        (
            "  part: card HTML without chart",
            *_timed(lambda v: ttest.result_card(r.recompute(level=v), chart=False), levels),
        )
    )
    rows.append(
        (
            "  part: chart spec (Vega-Lite dict)",
            *_timed(lambda v: ttest.result_spec(r.recompute(level=v)), levels),
        )
    )
    # vl-convert answers a repeated spec from a cache, so each SVG is timed on a new spec.
    specs = {v: ttest.result_spec(r.recompute(level=v - 2e-4)) for v in levels}
    rows.append(("  part: SVG (vl-convert)", *_timed(lambda v: charts.to_svg(specs[v]), levels)))

    td = widgets.explore_tdist(tinfer.tdist(10))
    td.df.value = 12.0
    rows.append(
        (
            "t-distribution explorer: df change",
            *_timed(_set(td.df), [3 + 0.37 * i for i in range(REPEATS)]),
        )
    )
    pl = widgets.explore_plan(tinfer.plan("two-sample", effect=0.5, power=0.8))
    pl.effect.value = 0.55
    rows.append(
        (
            "plan explorer: effect change",
            *_timed(_set(pl.effect), [0.3 + 0.03 * i for i in range(REPEATS)]),
        )
    )

    print(f"{'what':44s} {'wall ms':>9s} {'CPU ms':>9s}   (median of {REPEATS})")
    for name, wall, cpu in rows:
        print(f"{name:44s} {wall:9.1f} {cpu:9.1f}")
    verdict = "meets" if rows[0][1] <= TARGET_MS else "misses"
    print(f"\nlevel change {rows[0][1]:.1f} ms wall: {verdict} the {TARGET_MS:.0f} ms target")


if __name__ == "__main__":
    main()
