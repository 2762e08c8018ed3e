"""Timing of study planning: one solve for n, and a 1,000-point power curve.

Run with ``python benchmarks/bench_power.py``. Prints the median warm wall time of each
case (targets: one solve for n at most 10 ms, a 1,000-point curve at most 50 ms), all
measured in the same run.
"""

from __future__ import annotations

import statistics
import time

import numpy as np

import tinfer
from tinfer.core import power as pw


def median_ms(func, repeat: int = 50, warm: int = 3) -> float:
    """Median wall time of ``func()`` in milliseconds after ``warm`` untimed calls."""
    for _ in range(warm):
        func()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        func()
        times.append(time.perf_counter() - t0)
    return 1000.0 * statistics.median(times)


def main() -> None:
    ns = np.arange(2, 1002)
    effects = np.linspace(0.1, 1.5, 1000)
    cases = [
        (
            "plan: solve n (two-sample, d=0.5, power .8)",
            10.0,
            lambda: tinfer.plan("two-sample", effect=0.5, power=0.8),
        ),
        (
            "plan: solve n (one-sample, d=0.05, power .9)",
            10.0,
            lambda: tinfer.plan("one-sample", effect=0.05, power=0.9),
        ),
        (
            "plan: solve effect (paired, n=30, power .8)",
            10.0,
            lambda: tinfer.plan("paired", n=30, power=0.8),
        ),
        (
            "plan: solve n (equivalence, two-sample)",
            10.0,
            lambda: tinfer.plan("equivalence-two-sample", margin=0.5, power=0.8),
        ),
        (
            "plan: power curve, 1,000 n (two-sample)",
            50.0,
            lambda: tinfer.plan("two-sample", n=ns, effect=0.3),
        ),
        ("core: power curve, 1,000 n (t_power)", 50.0, lambda: pw.t_power(0.3, ns, ns)),
        (
            "plan: 1,000 solves for n (grid of effects)",
            None,
            lambda: tinfer.plan("two-sample", effect=effects, power=0.8),
        ),
        (
            "plan: TOST power curve, 1,000 n",
            None,
            lambda: tinfer.plan("equivalence-paired", margin=0.5, n=ns),
        ),
    ]
    print(f"{'case':<48} {'median ms':>10} {'target':>8}")
    for name, target, func in cases:
        ms = median_ms(func, repeat=30 if "1,000" in name else 200)
        tgt = f"<= {target:g}" if target else "-"
        print(f"{name:<48} {ms:>10.3f} {tgt:>8}")


if __name__ == "__main__":
    main()
