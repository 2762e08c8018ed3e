"""The Dask accessor: same results as pandas, by per-partition summaries merged pairwise."""

from __future__ import annotations

import warnings
from fractions import Fraction

import numpy as np
import pandas as pd
import pytest

dd = pytest.importorskip("dask.dataframe")
distributed = pytest.importorskip("distributed")

import tinfer  # noqa: E402
import tinfer.scale.dask  # noqa: E402  (registers ddf.tinfer)

pytestmark = pytest.mark.dask
RTOL = 1e-12
FIELDS = ("estimate", "se", "t", "df", "p", "ci_low", "ci_high", "effect", "p_adjusted")


@pytest.fixture(scope="module")
def client():
    """A small in-process cluster, as the module docstring suggests for a scheduler."""
    cluster = distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=False, dashboard_address=None
    )
    with distributed.Client(cluster) as c:
        yield c
    cluster.close()


def kiln(seed: int = 0, n: int = 900) -> pd.DataFrame:
    """Invented data: tile strength (MPa) by kiln, glaze (matte/gloss) and shift."""
    rng = np.random.default_rng(seed)
    df = pd.DataFrame(
        {
            "kiln": rng.choice(["k1", "k2", "k3", "k4"], n),
            "glaze": rng.choice(["matte", "gloss"], n),
            "shift": rng.integers(1, 4, n),
            "strength": rng.normal(41, 3, n),
            "chip_mm": rng.normal(2, 0.4, n),
        }
    )
    df["fired"] = df["strength"] + rng.normal(0.6, 1.0, n)
    df.loc[[7, 99, 500], "strength"] = np.nan
    return df


def assert_same(a, b, fields=("estimate", "se", "t", "df", "p")):
    for f in fields:
        np.testing.assert_allclose(getattr(a, f), getattr(b, f), rtol=RTOL, err_msg=f)
    if hasattr(a.effect, "value"):
        np.testing.assert_allclose(a.effect.value, b.effect.value, rtol=RTOL)


# ---------------------------------------------------------------- one_sample, two_sample, paired
class TestSingleTests:
    def test_one_sample(self, client):
        """ddf.tinfer.one_sample equals the pandas result to 1e-12."""
        df = kiln()
        r = dd.from_pandas(df, npartitions=5).tinfer.one_sample("strength", null=40.5)
        ref = df.tinfer.one_sample("strength", null=40.5)
        assert_same(r, ref)
        np.testing.assert_allclose(r.ci, ref.ci, rtol=RTOL)
        np.testing.assert_allclose(r.effect.ci, ref.effect.ci, rtol=1e-10)
        assert r.groups[0].n_missing == 3

    def test_two_sample(self, client):
        """ddf.tinfer.two_sample (Welch and pooled, chosen groups) equals pandas to 1e-12."""
        df = kiln(1)
        ddf = dd.from_pandas(df, npartitions=4)
        assert_same(
            ddf.tinfer.two_sample("chip_mm", by="glaze"),
            df.tinfer.two_sample("chip_mm", by="glaze"),
        )
        r = ddf.tinfer.two_sample("strength", by="kiln", groups=("k3", "k1"), pooled=True)
        ref = df.tinfer.two_sample("strength", by="kiln", groups=("k3", "k1"), pooled=True)
        assert_same(r, ref)
        assert r.comparison == ref.comparison == "k3 minus k1"

    def test_paired(self, client):
        """ddf.tinfer.paired on wide columns equals pandas, descriptives included."""
        df = kiln(2)
        r = dd.from_pandas(df, npartitions=3).tinfer.paired("fired", "strength")
        ref = df.tinfer.paired("fired", "strength")
        assert_same(r, ref)
        for g, h in zip(r.groups, ref.groups, strict=True):
            assert g.n == h.n
            np.testing.assert_allclose([g.mean, g.sd], [h.mean, h.sd], rtol=RTOL)


# ---------------------------------------------------------------- compare
class TestCompare:
    def test_two_sample_segments(self, client):
        """ddf.tinfer.compare equals df.tinfer.compare row by row (1e-12)."""
        df = kiln(3)
        kw = dict(by="glaze", within=["kiln", "shift"], adjust="bh")
        m = dd.from_pandas(df, npartitions=6).tinfer.compare(["strength", "chip_mm"], **kw)
        ref = df.tinfer.compare(["strength", "chip_mm"], **kw)
        assert m.segments == ref.segments and m.metrics == ref.metrics
        assert_same(m, ref, FIELDS)
        np.testing.assert_array_equal(m.discovery, ref.discovery)

    def test_one_sample_and_paired(self, client):
        """One-sample and paired batches on Dask equal the pandas batches."""
        df = kiln(4)
        ddf = dd.from_pandas(df, npartitions=4)
        assert_same(
            ddf.tinfer.compare("strength", within="kiln", null=41.0),
            df.tinfer.compare("strength", within="kiln", null=41.0),
            FIELDS,
        )
        assert_same(
            ddf.tinfer.compare(paired=("fired", "strength"), within="shift"),
            df.tinfer.compare(paired=("fired", "strength"), within="shift"),
            FIELDS,
        )

    def test_numacc_large_means(self, client):
        """Values near 1e9 with unit noise and 1e7 + 0.1 steps: Dask equals the exact answer,
        where a raw sum-of-squares variance loses every digit."""
        rng = np.random.default_rng(5)
        n = 400
        df = pd.DataFrame({"seg": np.repeat([0, 1], n), "arm": np.tile(["p", "q"], n)})
        df["w"] = 1e9 + rng.normal(0, 1, 2 * n) + np.where(df.arm == "p", 0.5, 0.0)
        num = 1e7 + np.tile([0.2, 0.1, 0.3], 100)  # NumAcc4-like (NIST StRD pattern)
        extra = pd.DataFrame(
            {"seg": 2, "arm": np.repeat(["p", "q"], 300), "w": np.concatenate([num, num + 0.1])}
        )
        df = pd.concat([df, extra], ignore_index=True)
        ddf = dd.from_pandas(df, npartitions=7)
        m = ddf.tinfer.compare("w", by="arm", within="seg")
        for i, seg in enumerate([0, 1, 2]):
            for arm, sd in (("p", m.sd_a[i]), ("q", m.sd_b[i])):
                xs = [Fraction(float(v)) for v in df.w[(df.seg == seg) & (df.arm == arm)]]
                mean = sum(xs) / len(xs)
                exact_sd = float(sum((x - mean) ** 2 for x in xs) / (len(xs) - 1)) ** 0.5
                np.testing.assert_allclose(sd, exact_sd, rtol=1e-10)
        ref = df.tinfer.compare("w", by="arm", within="seg")
        assert_same(m, ref, FIELDS)
        exact_est = []
        for seg in (0, 1, 2):
            means = []
            for arm in ("p", "q"):
                xs = [Fraction(float(v)) for v in df.w[(df.seg == seg) & (df.arm == arm)]]
                means.append(sum(xs) / len(xs))
            exact_est.append(float(means[0] - means[1]))
        np.testing.assert_allclose(m.estimate, exact_est, rtol=1e-12)
        # A textbook one-pass formula (sum of squares minus n mean^2) on the same data,
        # to show what the pairwise merge avoids (common practice, no source).
        x = df.w[(df.seg == 0) & (df.arm == "p")].to_numpy()
        naive = (np.sum(x * x) - x.size * np.mean(x) ** 2) / (x.size - 1)
        assert abs(np.sqrt(max(naive, 0.0)) - m.sd_a[0]) > 0.1

    def test_client_scheduler_example(self, client):
        """The docs example: a Client pointed at a scheduler address runs the accessor there."""
        df = kiln(6)
        ddf = dd.from_pandas(df, npartitions=3)
        address = client.scheduler.address
        with distributed.Client(address, set_as_default=True) as other:
            assert distributed.get_client() is other

            def count(dask_scheduler):
                return dask_scheduler.transition_counter

            before = other.run_on_scheduler(count)
            r = ddf.tinfer.one_sample("chip_mm", null=2.0)
            tasks_seen = other.run_on_scheduler(count) - before
        assert_same(r, df.tinfer.one_sample("chip_mm", null=2.0))
        assert tasks_seen > 0

    def test_small_segment_warning(self, client):
        """A Dask segment too small to test gets NaN and a warning, as on pandas."""
        df = pd.DataFrame(
            {
                "g": ["a"] * 6 + ["b"] * 3,
                "arm": ["x", "y"] * 3 + ["x", "y", "y"],
                "v": [1.0, 2.0, 3.0, 5.0, 4.0, 3.5, 1.0, 2.0, 4.0],
            }
        )
        with pytest.warns(tinfer.SmallSegmentWarning):
            m = dd.from_pandas(df, npartitions=2).tinfer.compare("v", by="arm", within="g")
        assert np.isnan(m.p[1]) and np.isfinite(m.p[0])

    def test_rows_with_missing_keys_counted_once(self, client):
        """Rows with a missing segment key are counted once, not once per group and partition."""
        df = kiln(5)
        df.loc[[3, 40, 41, 600], "kiln"] = None  # 4 rows, counted by hand
        m = dd.from_pandas(df, npartitions=3).tinfer.compare("chip_mm", by="glaze", within="kiln")
        assert m.warnings[0].startswith("4 row(s) with a missing segment key")
        ref = df.tinfer.compare("chip_mm", by="glaze", within="kiln")
        assert_same(m, ref, FIELDS)

    def test_import_tinfer_does_not_import_dask(self):
        """import tinfer alone leaves dask unimported (checked in a fresh interpreter)."""
        import subprocess
        import sys

        code = "import sys, tinfer; print('dask' in sys.modules)"
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
        assert out.stdout.strip() == "False"


def test_warning_free_merge():
    """Merging partitions where a group is absent from some raises no numpy warnings."""
    df = pd.DataFrame({"g": ["a"] * 4 + ["b"] * 4, "v": [1.0, 2.0, 4.0, 8.0, 3.0, 3.5, 4.0, 6.0]})
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        m = dd.from_pandas(df, npartitions=4).tinfer.compare("v", within="g", null=2.0)
    assert_same(m, df.tinfer.compare("v", within="g", null=2.0), FIELDS)


def test_all_empty_partitions_give_a_clear_error():
    """A filter that leaves every partition empty gives a clear error, never the internal
    summary columns' names."""
    ddf = dd.from_pandas(kiln(3), npartitions=3)
    empty = ddf[ddf.strength > 1e9]
    for run in (
        lambda: empty.tinfer.compare("strength", by="glaze"),
        lambda: empty.tinfer.compare("strength", within="kiln"),
    ):
        with pytest.raises(tinfer.DataError, match="every partition is empty") as info:
            run()
        assert "__" not in str(info.value)
