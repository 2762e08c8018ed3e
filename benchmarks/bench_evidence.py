"""Benchmark: what the evidence and report features add to a batch, and tinfer's percentiles.

Invented data: 2,000,000 basket values in 2,000 stores, two checkout flows per store.
Prints, measured side by side in one run (best of ``--repeat``):

- the time ``.bayes_factors()`` (the JZS factor of every row), ``.relative_lift()``
  (Fieller's interval of every row) and ``tinfer.table(batch).to_markdown()`` add to a batch,
  as a share of ``compare(...).to_frame()`` on the same rows;
- ``tinfer.core.distribution.ppf`` on 10,000 (q, df) pairs against ``scipy.special.stdtrit``
  (tinfer solves on its own tail area, so its digits do not depend on scipy's inverse).

Run: ``.venv/bin/python benchmarks/bench_evidence.py`` (``--rows``, ``--segments``).
"""

from __future__ import annotations

import argparse

import numpy as np
import pandas as pd
from scipy import special
from timing import best

import tinfer
from tinfer.core import distribution as dist


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--rows", type=int, default=2_000_000)
    parser.add_argument("--segments", type=int, default=2_000)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    rng = np.random.default_rng(5)
    frame = pd.DataFrame(
        {
            "store": rng.integers(0, args.segments, args.rows),
            "flow": np.where(rng.random(args.rows) < 0.5, "new", "old"),
            "basket": rng.gamma(4.0, 10.0, args.rows),
        }
    )

    def run():
        return frame.tinfer.compare("basket", by="flow", within="store", groups=("new", "old"))

    batch = run()
    base = best(lambda: run().to_frame(), args.repeat)
    print(f"{len(batch.t):,} tests; compare(...).to_frame() on {args.rows:,} rows {base:.3f} s")
    for name, fn in (
        ("bayes_factors()", batch.bayes_factors),
        ("relative_lift()", batch.relative_lift),
        ("table(...).to_markdown()", lambda: tinfer.table(batch).to_markdown()),
    ):
        t = best(fn, args.repeat)
        print(f"  {name:28s} {t:.3f} s more = +{t / base:.2f}x of compare().to_frame()")
    q = rng.uniform(0.5, 0.9999, 10_000)
    df = rng.uniform(2.0, 500.0, 10_000)
    ours = best(lambda: dist.ppf(q, df), args.repeat)
    theirs = best(lambda: special.stdtrit(df, q), args.repeat)
    print(f"ppf on 10,000 values: tinfer {ours * 1e3:.1f} ms, scipy stdtrit {theirs * 1e3:.1f} ms")
    print(f"  ratio {ours / theirs:.2f}x (the price of digits that do not depend on scipy)")


if __name__ == "__main__":
    main()
