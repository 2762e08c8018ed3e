"""Speed of the core, measured side by side in one run (a script, not a test).

(a) One Welch test on two columns of 1,000,000 rows: ``df.tinfer.two_sample(("a", "b"))``
    against ``scipy.stats.ttest_ind(a, b, equal_var=False)`` on the same arrays; runs
    interleaved, medians compared. Target: tinfer within 1.2x of scipy.
(b) ``import tinfer`` on top of ``import pandas``, in fresh interpreters (median of
    several). Target: at most 0.4 s. Also checks that altair, ipywidgets and scipy.stats
    are not imported by ``import tinfer``.

Run: ``.venv/bin/python benchmarks/bench_core.py [repeats]``
"""

from __future__ import annotations

import json
import statistics
import subprocess
import sys
import time

import numpy as np
import pandas as pd

import tinfer  # noqa: F401  (registers the accessor)

ROWS = 1_000_000
HEAVY = ("altair", "ipywidgets", "scipy.stats", "vl_convert")

_IMPORT_PROBE = """
import json, sys, time
import pandas
t0 = time.perf_counter()
import tinfer
dt = time.perf_counter() - t0
print(json.dumps({"seconds": dt, "loaded": [m for m in HEAVY if m in sys.modules]}))
""".replace("HEAVY", repr(HEAVY))


def _side_by_side(ours, theirs, repeats: int) -> tuple[float, float, float]:
    """Median seconds of two callables run interleaved (alternating who goes first)."""
    times: dict[int, list[float]] = {0: [], 1: []}
    for i in range(repeats):
        for which in (0, 1) if i % 2 == 0 else (1, 0):
            start = time.perf_counter()
            (ours if which == 0 else theirs)()
            times[which].append(time.perf_counter() - start)
    mt, ms = statistics.median(times[0]), statistics.median(times[1])
    return mt, ms, mt / ms


def welch_ratio(repeats: int) -> tuple[float, float, float]:
    """Median seconds of tinfer and scipy on the same 1e6-row columns, and their ratio."""
    from scipy import stats

    rng = np.random.default_rng(20240601)
    df = pd.DataFrame({"a": rng.normal(10.0, 2.0, ROWS), "b": rng.normal(10.02, 2.5, ROWS)})
    a, b = df["a"].to_numpy(), df["b"].to_numpy()
    r = df.tinfer.two_sample(("a", "b"))  # warm-up, and a sanity check against scipy
    ref = stats.ttest_ind(a, b, equal_var=False)
    assert abs(r.t - ref.statistic) <= 1e-9 * abs(ref.statistic)
    return _side_by_side(
        lambda: df.tinfer.two_sample(("a", "b")),
        lambda: stats.ttest_ind(a, b, equal_var=False),
        repeats,
    )


def one_sample_ratio(repeats: int) -> tuple[float, float, float]:
    """The same for one column of 1e6 rows against scipy's ttest_1samp."""
    from scipy import stats

    rng = np.random.default_rng(20240602)
    df = pd.DataFrame({"a": rng.normal(10.0, 2.0, ROWS)})
    a = df["a"].to_numpy()
    r, ref = df.tinfer.one_sample("a", null=10.0), stats.ttest_1samp(a, 10.0)
    assert abs(r.t - ref.statistic) <= 1e-9 * max(abs(ref.statistic), 1.0)
    return _side_by_side(
        lambda: df.tinfer.one_sample("a", null=10.0),
        lambda: stats.ttest_1samp(a, 10.0),
        repeats,
    )


def import_time(repeats: int) -> tuple[float, list[str]]:
    """Median seconds of ``import tinfer`` after pandas, each in a fresh interpreter."""
    times, loaded = [], set()
    for _ in range(repeats):
        out = subprocess.run(
            [sys.executable, "-c", _IMPORT_PROBE], capture_output=True, text=True, check=True
        )
        info = json.loads(out.stdout.strip().splitlines()[-1])
        times.append(info["seconds"])
        loaded.update(info["loaded"])
    return statistics.median(times), sorted(loaded)


def main(repeats: int = 21) -> int:
    mt, ms, ratio = welch_ratio(repeats)
    print(f"(a) Welch, 2 x {ROWS:,} rows, median of {repeats} interleaved runs")
    print(f"    tinfer {mt * 1e3:8.2f} ms   scipy {ms * 1e3:8.2f} ms   ratio {ratio:.2f}x")
    print(f"    target <= 1.20x: {'met' if ratio <= 1.2 else 'MISSED'}")
    m1, s1, r1 = one_sample_ratio(repeats)
    print(f"(c) one sample, {ROWS:,} rows, against scipy's ttest_1samp")
    print(f"    tinfer {m1 * 1e3:8.2f} ms   scipy {s1 * 1e3:8.2f} ms   ratio {r1:.2f}x")
    print(f"    target <= 1.20x: {'met' if r1 <= 1.2 else 'MISSED'}")
    it, loaded = import_time(max(5, repeats // 3))
    print(f"(b) import tinfer after pandas, median of {max(5, repeats // 3)} fresh interpreters")
    print(f"    {it:.3f} s   target <= 0.40 s: {'met' if it <= 0.4 else 'MISSED'}")
    print(f"    heavy modules loaded by import tinfer: {loaded or 'none'}")
    return 0 if max(ratio, r1) <= 1.2 and it <= 0.4 and not loaded else 1


if __name__ == "__main__":
    sys.exit(main(int(sys.argv[1]) if len(sys.argv) > 1 else 21))
