"""Benchmark: pairwise families inside ``compare`` (issue: more than two groups).

10,000,000 rows in 10,000 segments with a 4-level arm column (invented: basket value by
store and page layout). Prints, measured side by side in one run:

- ``compare(..., pairwise=...)`` on the 4 levels (6 pairs or 3 against a control per
  segment) against the two-level ``compare`` on the same rows (the arm column folded to
  two levels), for each family method: target within 2x for the default (Games-Howell).
  Dunnett, whose critical value needs a two-dimensional integral per segment, runs on a
  tenth of the segments (``--dunnett-segments``) and is reported per segment;
- the whole table (``.to_frame()``, with every effect-size interval) the same way;
- a single ``df.tinfer.pairwise`` on 2 x 1e6 rows with 4 levels against a hand-written
  numpy + scipy Games-Howell pass (boolean masks, Welch per pair, scipy's
  studentized_range for the 6 p-values and 6 critical values).

Run: ``.venv/bin/python benchmarks/bench_pairwise.py`` (``--rows``, ``--segments``).
"""

from __future__ import annotations

import argparse

import numpy as np
import pandas as pd
from scipy import stats
from timing import best

import tinfer  # noqa: F401  (registers the accessor)

ARMS = np.array(["control", "layout A", "layout B", "layout C"])


def make_data(rows: int, segments: int, seed: int = 0) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    arm = rng.integers(0, 4, rows)
    y = rng.normal(50.0, 8.0, rows) + np.where(arm == 2, 0.8, 0.0)
    return pd.DataFrame(
        {
            "store": rng.integers(0, segments, rows),
            "arm": pd.Categorical.from_codes(arm, categories=ARMS),
            "basket": y,
        }
    )


def by_hand(df: pd.DataFrame) -> None:
    """Games-Howell as a user would write it: masks, Welch SE and df, scipy's range."""
    y = df["basket"].to_numpy()
    codes = df["arm"].cat.codes.to_numpy()
    parts = [y[codes == k] for k in range(4)]
    stats_ = [(p.size, p.mean(), p.var(ddof=1)) for p in parts]
    for i in range(4):
        for j in range(i):
            (na, ma, va), (nb, mb, vb) = stats_[i], stats_[j]
            se = np.sqrt(va / na + vb / nb)
            df_ = (va / na + vb / nb) ** 2 / ((va / na) ** 2 / (na - 1) + (vb / nb) ** 2 / (nb - 1))
            stats.studentized_range.sf(abs(ma - mb) / se * np.sqrt(2), 4, df_)
            stats.studentized_range.ppf(0.95, 4, df_)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=10_000_000)
    ap.add_argument("--segments", type=int, default=10_000)
    ap.add_argument("--dunnett-segments", type=int, default=1_000)
    args = ap.parse_args()
    df = make_data(args.rows, args.segments)
    two = df.assign(arm=pd.Categorical.from_codes(df["arm"].cat.codes % 2, categories=ARMS[:2]))
    print(f"{args.rows:,} rows, {args.segments:,} segments, 4 arms (and folded to 2 arms)")
    base = best(lambda: two.tinfer.compare("basket", by="arm", within="store"))
    base_table = best(lambda: two.tinfer.compare("basket", by="arm", within="store").to_frame())
    print(f"two-level compare: {base:.2f} s; with to_frame: {base_table:.2f} s")
    for method, against in (("games-howell", None), ("tukey-kramer", None), ("holm", None)):
        t = best(lambda m=method, a=against: df.tinfer.compare(
            "basket", by="arm", within="store", pairwise=m, against=a))  # fmt: skip
        tt = best(lambda m=method, a=against: df.tinfer.compare(
            "basket", by="arm", within="store", pairwise=m, against=a).to_frame(), 1)  # fmt: skip
        print(
            f"pairwise={method:<13} compare {t:6.2f} s = {t / base:4.2f}x the two-level "
            f"compare; with to_frame {tt:6.2f} s = {tt / base_table:4.2f}x"
        )
    small = make_data(args.rows // 10, args.dunnett_segments, seed=2)
    t = best(lambda: small.tinfer.compare(
        "basket", by="arm", within="store", pairwise="dunnett", against="control"), 1)  # fmt: skip
    print(
        f"pairwise=dunnett on {args.rows // 10:,} rows, {args.dunnett_segments:,} segments: "
        f"{t:.2f} s, {t / args.dunnett_segments * 1e3:.1f} ms per segment"
    )
    single = make_data(2_000_000, 1, seed=1)
    mine = best(lambda: single.tinfer.pairwise("basket", by="arm"))
    hand = best(lambda: by_hand(single))
    print(
        f"single pairwise on 2e6 rows: {mine * 1e3:.0f} ms vs by hand {hand * 1e3:.0f} ms "
        f"= {mine / hand:.2f}x"
    )


if __name__ == "__main__":
    main()
