"""Benchmark: experiment options inside ``compare`` (ratio metrics, pre-period adjustment).

10,000,000 rows in 10,000 segments, two arms (invented: visitors of a shop by landing page,
with sessions, revenue and last month's revenue). Prints, measured side by side in one run,
each against plain ``compare("revenue", by="arm", within="page")`` on the same rows:

- ``compare(..., ratio=("revenue", "sessions"))``: revenue per session by the delta method;
- ``compare("revenue", ..., covariate="pre_revenue")``: the CUPED adjustment per segment;
- the same three with ``.to_frame()`` (every effect-size interval);
- ``compare(..., cluster="visitor")`` on a tenth of the rows (a pandas groupby per unit).

Target (issue): ratio= and covariate= within 2x of plain compare.
Run: ``.venv/bin/python benchmarks/bench_experiment.py`` (``--rows``, ``--segments``).
"""

from __future__ import annotations

import argparse

import numpy as np
import pandas as pd
from timing import best

import tinfer  # noqa: F401  (registers the accessor)


def make_data(rows: int, segments: int, seed: int = 0) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    arm = rng.integers(0, 2, rows).astype(bool)
    sessions = rng.poisson(2.0, rows) + 1.0
    pre = rng.gamma(2.0, 20.0, rows)
    revenue = 0.6 * pre + sessions * rng.gamma(2.0, 5.0, rows) * np.where(arm, 1.02, 1.0)
    return pd.DataFrame(
        {
            "page": rng.integers(0, segments, rows),
            "arm": arm,
            "visitor": rng.integers(0, rows // 3, rows) * 2 + arm,
            "sessions": sessions,
            "revenue": revenue,
            "pre_revenue": pre,
        }
    )


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=10_000_000)
    ap.add_argument("--segments", type=int, default=10_000)
    args = ap.parse_args()
    df = make_data(args.rows, args.segments)
    acc = df.tinfer
    print(f"{args.rows:,} rows, {args.segments:,} segments, 2 arms")
    runs = {
        "plain compare": lambda: acc.compare("revenue", by="arm", within="page"),
        "ratio=": lambda: acc.compare(ratio=("revenue", "sessions"), by="arm", within="page"),
        "covariate=": lambda: acc.compare(
            "revenue", by="arm", within="page", covariate="pre_revenue"
        ),
    }
    base = base_table = None
    for name, fn in runs.items():
        t = best(fn)
        tt = best(lambda fn=fn: fn().to_frame())
        base, base_table = base or t, base_table or tt
        print(
            f"  {name:<14} {t:6.3f} s ({t / base:4.2f}x)   "
            f"with to_frame {tt:6.3f} s ({tt / base_table:4.2f}x)"
        )
    small = df.iloc[: args.rows // 10]
    plain = best(lambda: small.tinfer.compare("revenue", by="arm", within="page"))
    clus = best(
        lambda: small.tinfer.compare("revenue", by="arm", within="page", cluster="visitor"), 1
    )
    print(
        f"  cluster= on {len(small):,} rows: {clus:6.3f} s vs plain {plain:6.3f} s "
        f"({clus / plain:4.1f}x)"
    )


if __name__ == "__main__":
    main()
