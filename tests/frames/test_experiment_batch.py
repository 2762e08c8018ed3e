"""Experiments in a batch: ``compare(..., ratio=, covariate=, cluster=)``, ``compare_sums``,
the Dask accessor on the same options, and the relative lift of a paired result.

References: the single-test accessor ``two_sample(ratio=/covariate=)`` on each segment's rows
(itself checked against numpy and least squares in tests/core/test_comoments.py), manual
pandas groupby aggregation (per-unit means and sums, raw sums per segment and arm),
dask.dataframe against pandas, and a brute-force inversion of the paired t test with
scipy.optimize.brentq and scipy.stats.t.ppf for Fieller's interval (Fieller 1954, from
memory). The data are invented and seeded: a web shop's visitors in three countries, each
randomised to the new or the old checkout, with sessions, revenue and a pre-period spend.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import tinfer

STATS = ("estimate", "se", "df", "p")
GROUPS = ("new", "old")


def _visitors(n: int = 1_200, seed: int = 5) -> pd.DataFrame:
    """One row per visitor: country, arm, sessions, revenue, pre-period and current spend."""
    rng = np.random.default_rng(seed)
    country = rng.choice(["de", "fr", "uk"], n, p=[0.5, 0.3, 0.2])
    arm = rng.choice(list(GROUPS), n)
    sessions = rng.poisson(2.5, n).astype(float) + 1.0
    mu = np.where(arm == "new", 5.2, 5.0) + np.where(country == "uk", 1.0, 0.0)
    revenue = rng.gamma(2.0 * sessions, mu / 2.0)  # sum of one gamma draw per session
    pre = rng.gamma(4.0, 10.0, n)
    spend = 5.0 + 0.7 * pre + rng.normal(0.0, 8.0, n) + np.where(arm == "new", 1.0, 0.0)
    return pd.DataFrame(
        {
            "visitor": np.arange(n),
            "country": country,
            "arm": arm,
            "sessions": sessions,
            "revenue": revenue,
            "pre": pre,
            "spend": spend,
        }
    )


def _days(n_visitors: int = 500, seed: int = 8) -> pd.DataFrame:
    """Several rows (days) per visitor; a visitor keeps one country and one arm."""
    rng = np.random.default_rng(seed)
    country = rng.choice(["de", "fr"], n_visitors)
    arm = rng.choice(list(GROUPS), n_visitors)
    level = rng.normal(40.0, 8.0, n_visitors) + np.where(arm == "new", 1.5, 0.0)
    pre = level + rng.normal(0.0, 4.0, n_visitors)
    reps = rng.integers(1, 6, n_visitors)
    idx = np.repeat(np.arange(n_visitors), reps)
    sessions = rng.poisson(2.0, idx.size).astype(float)  # a day may have no session
    df = pd.DataFrame(
        {
            "visitor": idx,
            "country": country[idx],
            "arm": arm[idx],
            "basket": level[idx] + rng.normal(0.0, 5.0, idx.size),
            "pre": pre[idx],
            "sessions": sessions,
            "revenue": rng.gamma(2.0 * sessions, 2.5),
        }
    )
    df.loc[[3, 40, 41], "basket"] = np.nan  # skipped by the per-unit means
    df.loc[[10, 77], "revenue"] = np.nan  # a ratio row needs both columns
    return df


def _by_segment(result, key: str = "country") -> pd.DataFrame:
    return result.to_frame().set_index(key)


def _field(obj, name: str) -> float:
    """A statistic of a TResult (attribute) or of a row of ``to_frame()`` (item)."""
    return float(obj[name] if isinstance(obj, pd.Series) else getattr(obj, name))


def _assert_stats(got, ref, rel=1e-12):
    for f in STATS:
        assert _field(got, f) == pytest.approx(_field(ref, f), rel=rel), f


# ---------------------------------------------------------------------------------------
# compare(ratio=) and compare(covariate=) against the single test per segment
# ---------------------------------------------------------------------------------------


def test_compare_ratio_equals_two_sample_ratio_per_segment():
    df = _visitors()
    df.loc[[4, 50], "revenue"] = np.nan  # a ratio row needs both columns
    df.loc[[700], "sessions"] = np.nan
    batch = df.tinfer.compare(
        by="arm", within="country", groups=GROUPS, ratio=("revenue", "sessions")
    )
    table = _by_segment(batch)
    assert set(table["metric"]) == {"revenue / sessions"}
    assert len(table) == 3
    for country, rows in df.groupby("country"):
        one = rows.tinfer.two_sample(ratio=("revenue", "sessions"), by="arm", groups=GROUPS)
        # reference: the single-test accessor on the segment's rows
        _assert_stats(table.loc[country], one)
        # reference: numpy sums, the ratio of sums per arm
        rows = rows.dropna(subset=["revenue", "sessions"])
        new, old = rows[rows["arm"] == "new"], rows[rows["arm"] == "old"]
        ratio = new["revenue"].sum() / new["sessions"].sum()
        ratio -= old["revenue"].sum() / old["sessions"].sum()
        assert table.loc[country, "estimate"] == pytest.approx(ratio, rel=1e-12)


def test_compare_ratio_list_of_pairs_with_value_columns():
    df = _visitors()
    df["orders"] = np.random.default_rng(1).poisson(1.0, len(df)) + 1.0
    batch = df.tinfer.compare(
        "spend",
        by="arm",
        within="country",
        groups=GROUPS,
        ratio=[("revenue", "sessions"), ("revenue", "orders")],
    )
    table = batch.to_frame().set_index(["country", "metric"])
    assert len(table) == 9
    for country, rows in df.groupby("country"):
        for num, den in (("revenue", "sessions"), ("revenue", "orders")):
            one = rows.tinfer.two_sample(ratio=(num, den), by="arm", groups=GROUPS)
            # reference: the single-test accessor on the segment's rows
            _assert_stats(table.loc[(country, f"{num} / {den}")], one)
        plain = rows.tinfer.two_sample("spend", by="arm", groups=GROUPS)
        _assert_stats(table.loc[(country, "spend")], plain)


def test_compare_covariate_equals_two_sample_covariate_per_segment():
    df = _visitors()
    batch = df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS, covariate="pre")
    table = _by_segment(batch)
    assert any("CUPED" in w for w in batch.warnings)
    plain = _by_segment(df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS))
    for country, rows in df.groupby("country"):
        one = rows.tinfer.two_sample("spend", by="arm", groups=GROUPS, covariate="pre")
        # reference: the single-test accessor on the segment's rows (theta per segment)
        _assert_stats(table.loc[country], one)
        # not trivially true: the adjustment changes the answer and shrinks the SE
        assert table.loc[country, "se"] < 0.8 * plain.loc[country, "se"]


def test_compare_covariate_theta_is_per_segment_not_pooled():
    df = _visitors()
    # the slope differs by country, so one pooled theta would give other estimates
    df.loc[df["country"] == "uk", "spend"] += 0.8 * df.loc[df["country"] == "uk", "pre"]
    table = _by_segment(
        df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS, covariate="pre")
    )
    uk = df[df["country"] == "uk"]
    y, x = uk["spend"].to_numpy(), uk["pre"].to_numpy()
    arm = (uk["arm"] == "new").to_numpy(float)
    design = np.column_stack([np.ones(len(uk)), arm, x])
    beta = np.linalg.lstsq(design, y, rcond=None)[0]
    # reference: numpy.linalg.lstsq of y on [1, arm, x] within the segment
    assert table.loc["uk", "estimate"] == pytest.approx(beta[1], rel=1e-10)


# ---------------------------------------------------------------------------------------
# compare(cluster=)
# ---------------------------------------------------------------------------------------


def test_compare_cluster_equals_compare_on_manual_unit_means():
    df = _days()
    got = df.tinfer.compare(
        ["basket", "pre"], by="arm", within="country", groups=GROUPS, cluster="visitor"
    )
    # reference: pandas groupby mean per (segment, arm, unit), NaN skipped
    units = df.groupby(["country", "arm", "visitor"], as_index=False)[["basket", "pre"]].mean()
    ref = units.tinfer.compare(["basket", "pre"], by="arm", within="country", groups=GROUPS)
    g = got.to_frame().set_index(["country", "metric"])
    r = ref.to_frame().set_index(["country", "metric"])
    assert len(g) == 4
    for idx in r.index:
        _assert_stats(g.loc[idx], r.loc[idx])
        assert g.loc[idx, "n_a"] == r.loc[idx, "n_a"] and g.loc[idx, "n_b"] == r.loc[idx, "n_b"]
    # not trivially true: treating days as units gives other standard errors
    rows = _by_segment(df.tinfer.compare("basket", by="arm", within="country", groups=GROUPS))
    for country in rows.index:
        assert rows.loc[country, "se"] < 0.9 * g.loc[(country, "basket"), "se"]
    assert any("rows became" in w for w in got.warnings)


def test_compare_cluster_ratio_equals_manual_unit_sums():
    df = _days()
    got = df.tinfer.compare(
        by="arm", within="country", groups=GROUPS, ratio=("revenue", "sessions"), cluster="visitor"
    )
    # reference: pandas groupby sum per (segment, arm, unit) of the rows with both values
    both = df.dropna(subset=["revenue", "sessions"])
    units = both.groupby(["country", "arm", "visitor"], as_index=False)[
        ["revenue", "sessions"]
    ].sum()
    ref = units.tinfer.compare(
        by="arm", within="country", groups=GROUPS, ratio=("revenue", "sessions")
    )
    g, r = _by_segment(got), _by_segment(ref)
    for country in r.index:
        _assert_stats(g.loc[country], r.loc[country])
    # the single test with cluster= agrees (reference: the single-test accessor)
    for country, rows in df.groupby("country"):
        one = rows.tinfer.two_sample(
            ratio=("revenue", "sessions"), by="arm", groups=GROUPS, cluster="visitor"
        )
        _assert_stats(g.loc[country], one)


def test_compare_cluster_with_covariate_equals_manual_unit_means():
    df = _days()
    got = _by_segment(
        df.tinfer.compare(
            "basket", by="arm", within="country", groups=GROUPS, cluster="visitor", covariate="pre"
        )
    )
    # reference: pandas groupby mean per (segment, arm, unit) of the value and the covariate
    units = df.groupby(["country", "arm", "visitor"], as_index=False)[["basket", "pre"]].mean()
    ref = _by_segment(
        units.tinfer.compare("basket", by="arm", within="country", groups=GROUPS, covariate="pre")
    )
    for country, rows in df.groupby("country"):
        _assert_stats(got.loc[country], ref.loc[country])
        # reference: the single-test accessor with the same options on the segment's rows
        one = rows.tinfer.two_sample(
            "basket", by="arm", groups=GROUPS, cluster="visitor", covariate="pre"
        )
        _assert_stats(got.loc[country], one)


def test_compare_cluster_leaves_out_units_in_both_arms():
    df = _days()
    moved = df[df["visitor"].isin([2, 9])].iloc[:2].copy()
    moved["arm"] = np.where(moved["arm"] == "new", "old", "new")
    both = pd.concat([df, moved], ignore_index=True)
    bad = moved["visitor"].unique()
    got = both.tinfer.compare(
        "basket", by="arm", within="country", groups=GROUPS, cluster="visitor"
    )
    assert any(
        f"{len(bad)} unit(s) of 'visitor' appear in more than one group" in w for w in got.warnings
    )
    # reference: pandas groupby mean per unit after dropping the visitors seen in both arms
    kept = both[~both["visitor"].isin(bad)]
    units = kept.groupby(["country", "arm", "visitor"], as_index=False)["basket"].mean()
    ref = _by_segment(units.tinfer.compare("basket", by="arm", within="country", groups=GROUPS))
    g = _by_segment(got)
    for country in ref.index:
        _assert_stats(g.loc[country], ref.loc[country])
    # not trivially true: without the rule the two extra rows would make two more units
    naive = both.groupby(["country", "arm", "visitor"])["basket"].mean()
    assert int(g["n_a"].sum() + g["n_b"].sum()) == len(units) < len(naive)


# ---------------------------------------------------------------------------------------
# summary path = raw path = Dask path
# ---------------------------------------------------------------------------------------


def _raw_sums(df: pd.DataFrame, y: str, x: str | None) -> pd.DataFrame:
    """What ``SELECT country, arm, COUNT(*), SUM(y), SUM(y*y), ... GROUP BY`` returns."""
    # reference: pandas groupby sums
    work = df.assign(_yy=df[y] ** 2)
    agg = {"n": (y, "size"), "sum": (y, "sum"), "sum_sq": ("_yy", "sum")}
    if x is not None:
        work = work.assign(_xx=df[x] ** 2, _xy=df[x] * df[y])
        agg |= {"sum_x": (x, "sum"), "sum_x_sq": ("_xx", "sum"), "sum_xy": ("_xy", "sum")}
    return work.groupby(["country", "arm"], as_index=False).agg(**agg)


@pytest.mark.parametrize(
    ("use", "y", "x", "opts"),
    [
        ("mean", "spend", None, {"columns": "spend"}),
        ("ratio", "revenue", "sessions", {"ratio": ("revenue", "sessions")}),
        ("covariate", "spend", "pre", {"columns": "spend", "covariate": "pre"}),
    ],
)
def test_compare_sums_equals_compare_on_the_rows(use, y, x, opts):
    df = _visitors()
    sums = _raw_sums(df, y, x)
    got = tinfer.compare_sums(sums, within="country", arm="arm", groups=GROUPS, use=use)
    ref = df.tinfer.compare(by="arm", within="country", groups=GROUPS, **opts)
    g, r = _by_segment(got), _by_segment(ref)
    assert len(g) == len(r) == 3
    for country in r.index:
        # reference: the raw-row path; raw sums of squares cancel a few digits
        _assert_stats(g.loc[country], r.loc[country], rel=1e-9)


def test_compare_sums_covariate_keeps_other_arms_out():
    df = _visitors()
    extra = df.sample(200, random_state=3).assign(arm="legacy", spend=lambda f: f["spend"] + 50)
    sums = _raw_sums(pd.concat([df, extra], ignore_index=True), "spend", "pre")
    got = _by_segment(
        tinfer.compare_sums(sums, within="country", arm="arm", groups=GROUPS, use="covariate")
    )
    ref = _by_segment(
        df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS, covariate="pre")
    )
    for country in ref.index:
        # reference: the raw-row path without the third arm (theta from the two compared arms)
        _assert_stats(got.loc[country], ref.loc[country], rel=1e-9)


@pytest.fixture(scope="module")
def dd():
    """dask.dataframe, with the Dask accessor registered."""
    module = pytest.importorskip("dask.dataframe")
    import tinfer.scale.dask  # noqa: F401  (registers ddf.tinfer)

    return module


def _with_gaps(df: pd.DataFrame, third_arm: bool = False) -> pd.DataFrame:
    df = df.copy()
    df.loc[[4, 50, 700], "revenue"] = np.nan
    df.loc[[333], "sessions"] = np.nan
    df.loc[[8, 900], "spend"] = np.nan  # no value: the row is not used (it has its covariate)
    if third_arm:  # rows of a third arm, and rows with a missing arm or segment key
        extra = df.sample(300, random_state=3).assign(
            arm="legacy", spend=lambda f: f["spend"] + 50.0, revenue=lambda f: 3.0 * f["revenue"]
        )
        df = pd.concat([df, extra], ignore_index=True)
        df.loc[[5, 6], "arm"] = np.nan
        df.loc[[7], "country"] = np.nan
    return df


@pytest.mark.parametrize(
    "opts",
    [
        {"ratio": ("revenue", "sessions")},
        {"ratio": [("revenue", "sessions")], "columns": ["spend", "pre"]},
        {"columns": ["spend", "revenue"], "covariate": "pre"},
    ],
)
@pytest.mark.parametrize("third_arm", [False, True])
def test_dask_compare_equals_pandas(dd, opts, third_arm):
    df = _with_gaps(_visitors(), third_arm)
    ddf = dd.from_pandas(df, npartitions=5)
    got = ddf.tinfer.compare(by="arm", within="country", groups=GROUPS, **opts)
    ref = df.tinfer.compare(by="arm", within="country", groups=GROUPS, **opts)
    g = got.to_frame().set_index(["country", "metric"])
    r = ref.to_frame().set_index(["country", "metric"])
    assert sorted(g.index) == sorted(r.index)
    for idx in r.index:
        # reference: the pandas accessor on the same rows
        _assert_stats(g.loc[idx], r.loc[idx], rel=1e-9)
        assert g.loc[idx, "n_a"] == r.loc[idx, "n_a"]


@pytest.mark.parametrize(
    "kwargs",
    [
        {"ratio": ("revenue", "sessions")},
        {"column": "spend", "covariate": "pre"},
    ],
)
@pytest.mark.parametrize("third_arm", [False, True])
def test_dask_two_sample_equals_pandas(dd, kwargs, third_arm):
    df = _with_gaps(_visitors(), third_arm)
    got = dd.from_pandas(df, npartitions=5).tinfer.two_sample(by="arm", groups=GROUPS, **kwargs)
    ref = df.tinfer.two_sample(by="arm", groups=GROUPS, **kwargs)
    # reference: the pandas accessor on the same rows
    _assert_stats(got, ref, rel=1e-9)
    assert got.ci == pytest.approx(ref.ci, rel=1e-9)


def _undefined_segment(kind: str) -> pd.DataFrame:
    """Visitors where one segment cannot be tested: no sessions at all in one arm of "uk"
    (the ratio is undefined) or a pre-period value constant within "fr" (no slope)."""
    df = _visitors()
    if kind == "ratio":
        m = (df["country"] == "uk") & (df["arm"] == "old")
        df.loc[m, ["sessions", "revenue"]] = 0.0
    else:
        df.loc[df["country"] == "fr", "pre"] = 3.0
    return df


UNDEFINED = {
    "ratio": ("revenue", "sessions", {"ratio": ("revenue", "sessions")}, "uk"),
    "covariate": ("spend", "pre", {"columns": "spend", "covariate": "pre"}, "fr"),
}


@pytest.mark.filterwarnings("ignore::tinfer.SmallSegmentWarning")
@pytest.mark.parametrize("kind", ["ratio", "covariate"])
@pytest.mark.parametrize("path", ["sums", "dask"])
def test_an_undefined_segment_is_the_same_on_every_path(request, kind, path):
    """An undefined ratio leaves its segment untestable (NaN); a covariate that does not
    vary within a segment leaves that segment unadjusted; the batch always runs."""
    y, x, opts, bad = UNDEFINED[kind]
    df = _undefined_segment(kind)
    if kind == "ratio":
        with pytest.warns(tinfer.SmallSegmentWarning, match=f"country={bad}"):
            batch = df.tinfer.compare(by="arm", within="country", groups=GROUPS, **opts)
    else:
        batch = df.tinfer.compare(by="arm", within="country", groups=GROUPS, **opts)
        assert any("does not vary within the groups" in w for w in batch.warnings)
    ref = _by_segment(batch)
    if kind == "ratio":
        assert np.isnan(ref.loc[bad, "estimate"])  # the pandas path: NaN for that segment
    else:
        plain = _by_segment(df.tinfer.compare(y, by="arm", within="country", groups=GROUPS))
        # reference: the unadjusted Welch test of the same segment (scipy agrees elsewhere)
        _assert_stats(ref.loc[bad], plain.loc[bad], rel=1e-12)
    if path == "sums":
        got = tinfer.compare_sums(
            _raw_sums(df, y, x), within="country", arm="arm", groups=GROUPS, use=kind
        )
    else:
        dd = request.getfixturevalue("dd")
        got = dd.from_pandas(df, npartitions=5).tinfer.compare(
            by="arm", within="country", groups=GROUPS, **opts
        )
    g = _by_segment(got)
    if kind == "ratio":
        assert np.isnan(g.loc[bad, "estimate"])
    else:
        _assert_stats(g.loc[bad], ref.loc[bad], rel=1e-9)
    for country in ref.index.drop(bad):
        # reference: the pandas accessor on the same rows
        _assert_stats(g.loc[country], ref.loc[country], rel=1e-9)


@pytest.mark.parametrize("func", ["compare", "two_sample"])
def test_dask_ignores_a_missing_covariate_outside_the_compared_arms(dd, func):
    df = _visitors()
    df.loc[17, "pre"] = np.nan
    df.loc[17, "arm"] = "legacy"  # not one of the compared groups
    ddf = dd.from_pandas(df, npartitions=5)
    if func == "compare":
        opts = {"within": "country", "groups": GROUPS, "covariate": "pre"}
        ref = df.tinfer.compare("spend", by="arm", **opts)  # pandas runs
        got = ddf.tinfer.compare("spend", by="arm", **opts)
        np.testing.assert_allclose(got.estimate, ref.estimate, rtol=1e-9)
    else:
        ref = df.tinfer.two_sample("spend", by="arm", groups=GROUPS, covariate="pre")
        got = ddf.tinfer.two_sample("spend", by="arm", groups=GROUPS, covariate="pre")
        # reference: the pandas accessor on the same rows
        _assert_stats(got, ref, rel=1e-9)


# ---------------------------------------------------------------------------------------
# errors
# ---------------------------------------------------------------------------------------


def test_value_without_covariate_is_a_data_error():
    df = _visitors()
    df.loc[17, "pre"] = np.nan  # spend is present in that row
    # common practice, no source: CUPED needs every unit's pre-period value
    with pytest.raises(tinfer.DataError, match="1 row\\(s\\) in the compared groups"):
        df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS, covariate="pre")
    with pytest.raises(tinfer.DataError, match="'pre'"):
        df.tinfer.two_sample("spend", by="arm", groups=GROUPS, covariate="pre")
    # a row outside the compared arms does not count
    df.loc[17, "arm"] = "legacy"
    df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS, covariate="pre")


def test_covariate_without_by_is_a_parameter_error():
    df = _visitors()
    with pytest.raises(tinfer.ParameterError, match="by="):
        df.tinfer.compare("spend", within="country", covariate="pre")


def test_ratio_with_paired_is_refused():
    df = _visitors()
    with pytest.raises(tinfer.TinferError, match="paired"):
        df.tinfer.compare(paired=("spend", "pre"), within="country", ratio=("revenue", "sessions"))


def test_ratio_with_covariate_is_refused():
    df = _visitors()
    with pytest.raises(tinfer.TinferError, match="ratio"):
        df.tinfer.compare(by="arm", covariate="pre", ratio=("revenue", "sessions"))


# ---------------------------------------------------------------------------------------
# relative_lift of a paired result: Fieller's interval by brute force
# ---------------------------------------------------------------------------------------


def _paired_sample(n: int = 30, seed: int = 12, after_mean: float = 40.0) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    base = rng.normal(after_mean, 6.0, n)
    return pd.DataFrame(
        {"before": 1.08 * base + rng.normal(0.0, 3.0, n), "after": base + rng.normal(0, 2, n)}
    )


def _statistic(a, b, rho):
    """|mean(a - rho b)| / (sd(a - rho b) / sqrt n): the paired t of a - rho b against 0."""
    d = a - rho * b
    return abs(d.mean()) / (d.std(ddof=1) / np.sqrt(d.size))


def _fieller_by_brute_force(a, b, level=0.95):
    # Fieller (1954), from memory: the set of rho the paired t of a - rho b does not reject
    q = stats.t.ppf(0.5 + level / 2, a.size - 1)  # reference: scipy.stats.t.ppf
    rho_hat = a.mean() / b.mean()

    def h(rho):
        return _statistic(a, b, rho) - q

    assert h(rho_hat) < 0
    step, lo_end, hi_end = 0.01, rho_hat, rho_hat
    while h(lo_end) < 0:
        lo_end -= step
    while h(hi_end) < 0:
        hi_end += step
    # reference: scipy.optimize.brentq
    lo = optimize.brentq(h, lo_end, rho_hat, xtol=1e-14, rtol=1e-14)
    hi = optimize.brentq(h, rho_hat, hi_end, xtol=1e-14, rtol=1e-14)
    return rho_hat, lo, hi


def test_paired_fieller_lift_equals_the_inverted_paired_t():
    df = _paired_sample()
    df.loc[4, "after"] = np.nan  # that pair is dropped; the lift uses complete pairs
    lift = df.tinfer.paired("before", "after").relative_lift(method="fieller")
    ok = df.dropna()
    a, b = ok["before"].to_numpy(), ok["after"].to_numpy()
    rho, lo, hi = _fieller_by_brute_force(a, b)
    assert lift.lift == pytest.approx(rho - 1.0, rel=1e-12)  # reference: numpy means
    assert lift.ci[0] == pytest.approx(lo - 1.0, abs=1e-10)
    assert lift.ci[1] == pytest.approx(hi - 1.0, abs=1e-10)
    assert lift.bounded and lift.df == a.size - 1 == 28
    # not trivially true: the interval ignoring the pairing (Welch, independent means) is
    # much wider here, the columns being strongly correlated
    welch = df.tinfer.two_sample(("before", "after")).relative_lift(method="fieller")
    assert welch.ci[1] - welch.ci[0] > 2 * (lift.ci[1] - lift.ci[0])


def test_paired_fieller_lift_at_another_level_and_on_a_grid():
    df = _paired_sample(seed=13)
    lift = df.tinfer.paired("before", "after", level=0.9).relative_lift()
    a, b = df["before"].to_numpy(), df["after"].to_numpy()
    _, lo, hi = _fieller_by_brute_force(a, b, level=0.9)
    assert lift.ci == pytest.approx((lo - 1.0, hi - 1.0), abs=1e-10)
    # reference: a grid of step 1e-6 around each limit; the statistic crosses t there
    q = stats.t.ppf(0.95, a.size - 1)  # reference: scipy.stats.t.ppf
    for limit in (lo, hi):
        grid = limit + np.arange(-50, 51) * 1e-6
        inside = np.array([_statistic(a, b, r) <= q for r in grid])
        edges = grid[np.flatnonzero(np.diff(inside))]
        assert edges.size == 1
        assert abs(edges[0] - (lift.ci[0 if limit == lo else 1] + 1.0)) <= 1e-6


def test_paired_log_lift_is_the_delta_method_with_the_covariance():
    df = _paired_sample(seed=14)
    lift = df.tinfer.paired("before", "after").relative_lift(method="log")
    a, b = df["before"].to_numpy(), df["after"].to_numpy()
    n = a.size
    c = np.cov(np.vstack([a, b]))  # reference: numpy.cov
    ma, mb = a.mean(), b.mean()
    # delta method on log(ma / mb) with the covariance of the means, from memory
    se = np.sqrt(c[0, 0] / n / ma**2 + c[1, 1] / n / mb**2 - 2 * c[0, 1] / n / (ma * mb))
    q = stats.t.ppf(0.975, n - 1)  # reference: scipy.stats.t.ppf
    assert lift.lift == pytest.approx(ma / mb - 1.0, rel=1e-12)
    assert lift.ci[0] == pytest.approx(ma / mb * np.exp(-q * se) - 1.0, abs=1e-10)
    assert lift.ci[1] == pytest.approx(ma / mb * np.exp(q * se) - 1.0, abs=1e-10)


def test_paired_fieller_is_unbounded_when_the_second_mean_is_not_clear_of_zero():
    rng = np.random.default_rng(15)
    after = rng.normal(0.5, 5.0, 30)
    df = pd.DataFrame({"before": after + rng.normal(1.0, 1.0, 30), "after": after})
    lift = df.tinfer.paired("before", "after").relative_lift()
    # Fieller (1954), from memory: bounded exactly when the t of the second mean exceeds q
    t_b = abs(after.mean()) / (after.std(ddof=1) / np.sqrt(30))
    assert t_b < stats.t.ppf(0.975, 29)  # reference: scipy.stats.t.ppf
    assert not lift.bounded
    assert np.isnan(lift.ci[0]) and np.isnan(lift.ci[1])


@pytest.mark.parametrize(
    "opts",
    [
        {"columns": "basket"},
        {"columns": "basket", "covariate": "pre"},
        {"ratio": ("revenue", "sessions")},
    ],
)
def test_dask_cluster_equals_pandas_cluster(dd, opts):
    df = _days()
    df.loc[df.index[-1], "arm"] = "new" if df["arm"].iloc[-1] == "old" else "old"  # both arms
    ddf = dd.from_pandas(df, npartitions=4)
    ref = df.tinfer.compare(by="arm", within="country", groups=GROUPS, cluster="visitor", **opts)
    got = ddf.tinfer.compare(by="arm", within="country", groups=GROUPS, cluster="visitor", **opts)
    # reference: the pandas accessor, itself checked against a manual groupby above
    for f in ("estimate", "se", "df", "p", "n_a", "n_b"):
        np.testing.assert_allclose(getattr(got, f), getattr(ref, f), rtol=1e-9)
    assert got.warnings[:2] == ref.warnings[:2]  # rows -> units; the unit in both arms
    one = {k: v for k, v in opts.items() if k != "columns"} | {"column": opts.get("columns")}
    single = ddf.tinfer.two_sample(by="arm", groups=GROUPS, cluster="visitor", **one)
    seg = df.tinfer.two_sample(by="arm", groups=GROUPS, cluster="visitor", **one)
    _assert_stats(single, seg, rel=1e-9)


def test_cluster_keeps_segment_names_that_look_like_its_own_columns():
    df = _days()
    df["__tv0"] = df["country"]  # a segment column named like a column of the unit table
    ref = df.tinfer.compare("basket", by="arm", within="country", groups=GROUPS, cluster="visitor")
    got = df.tinfer.compare("basket", by="arm", within="__tv0", groups=GROUPS, cluster="visitor")
    # reference: the same segments under their ordinary name
    np.testing.assert_allclose(got.estimate, ref.estimate, rtol=1e-15)
    assert list(got.to_frame()["__tv0"]) == list(ref.to_frame()["country"])


def test_covariate_must_be_a_column_of_its_own():
    df = _visitors()
    # common practice, no source: a column cannot adjust itself or split the rows it adjusts
    for opts in ({"covariate": "spend"}, {"covariate": "country"}):
        with pytest.raises(tinfer.ParameterError, match="covariate="):
            df.tinfer.compare("spend", by="arm", within="country", groups=GROUPS, **opts)


@pytest.mark.filterwarnings("ignore::tinfer.SmallSegmentWarning")  # one-row segments
def test_cluster_with_many_large_keys_does_not_overflow():
    rng = np.random.default_rng(3)
    n = 20_000
    df = pd.DataFrame(
        {
            "k1": rng.integers(0, 10**12, n),  # wide keys: almost every row its own level
            "k2": rng.integers(0, 10**12, n),
            "k3": rng.integers(0, 10**12, n),
            "arm": rng.choice(list(GROUPS), n),
            "visitor": rng.integers(0, 10**15, n),
            "basket": rng.normal(40.0, 5.0, n),
        }
    )
    df.loc[: n // 2, ["k1", "k2", "k3"]] = [1, 2, 3]  # half the rows in one segment
    got = df.tinfer.compare(
        "basket", by="arm", within=["k1", "k2", "k3"], groups=GROUPS, cluster="visitor"
    )
    means = df.groupby(["k1", "k2", "k3", "arm", "visitor"])["basket"].mean().reset_index()
    ref = means.tinfer.compare("basket", by="arm", within=["k1", "k2", "k3"], groups=GROUPS)
    # reference: compare on a manual pandas groupby of the per-unit means
    a, b = got.to_frame(), ref.to_frame()
    keys = ["k1", "k2", "k3"]
    a, b = a.sort_values(keys).reset_index(drop=True), b.sort_values(keys).reset_index(drop=True)
    np.testing.assert_array_equal(a[keys].to_numpy(), b[keys].to_numpy())
    np.testing.assert_allclose(a["estimate"], b["estimate"], rtol=1e-12, equal_nan=True)


def test_experiment_options_leave_the_callers_frame_untouched():
    df = _days()
    df.loc[5, "pre"] = np.nan
    df.loc[5, "arm"] = "legacy"  # outside the compared groups: allowed
    before = df.copy()
    df.tinfer.compare(
        "basket", by="arm", within="country", groups=GROUPS, cluster="visitor", covariate="pre"
    )
    df.tinfer.compare(by="arm", groups=GROUPS, ratio=("revenue", "sessions"), cluster="visitor")
    df.tinfer.two_sample(by="arm", groups=GROUPS, ratio=("revenue", "sessions"), relative=True)
    # reference: pandas' own equality check on a copy taken before (common practice)
    pd.testing.assert_frame_equal(df, before)
