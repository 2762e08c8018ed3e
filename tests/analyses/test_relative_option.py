"""``relative=`` on two_sample, paired, from_summary and compare: the lift travels with the
result (card, text, tables, recompute) and equals the lift computed on its own."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import tinfer
from tinfer.display.render import html


@pytest.fixture
def shop() -> pd.DataFrame:
    rng = np.random.default_rng(11)
    n = 1200
    df = pd.DataFrame(
        {
            "arm": rng.choice(["new", "old"], n),
            "device": rng.choice(["phone", "desktop"], n),
        }
    )
    df["basket"] = rng.gamma(4.0, 10.0, n) * np.where(df["arm"] == "new", 1.06, 1.0)
    return df


def _fieller_by_inversion(a, b, level):
    """Fieller's limits by solving |t(rho)| = q for a - rho b, q at the Welch-type df of
    a - rho_hat b (the df tinfer documents: taken at the estimate)."""
    na, nb = len(a), len(b)
    ma, mb, va, vb = a.mean(), b.mean(), a.var(ddof=1) / na, b.var(ddof=1) / nb
    r = ma / mb
    v = va + r * r * vb
    q = stats.t.ppf(0.5 + level / 2, v * v / (va * va / (na - 1) + (r * r * vb) ** 2 / (nb - 1)))

    def excess(rho):
        return abs(ma - rho * mb) / np.sqrt(va + rho * rho * vb) - q

    return optimize.brentq(excess, r * 0.5, r, xtol=1e-14), optimize.brentq(
        excess, r, r * 1.5, xtol=1e-14
    )


def test_two_sample_lift_matches_an_inversion_of_the_t_of_a_minus_rho_b(shop):
    r = shop.tinfer.two_sample("basket", by="arm", relative=True)
    a = shop.loc[shop["arm"] == "new", "basket"].to_numpy()
    b = shop.loc[shop["arm"] == "old", "basket"].to_numpy()
    lo, hi = _fieller_by_inversion(a, b, 0.95)
    # reference: Fieller (1954) confidence set solved with scipy.optimize.brentq and
    # scipy.stats.t.ppf (Welch-type df at the estimate, as tinfer documents)
    assert r.lift.ci[0] == pytest.approx(lo - 1.0, abs=1e-9)
    assert r.lift.ci[1] == pytest.approx(hi - 1.0, abs=1e-9)
    assert r.lift.lift == pytest.approx(a.mean() / b.mean() - 1.0, rel=1e-12)


def test_the_lift_is_shown_in_the_card_the_text_and_the_table(shop):
    r = shop.tinfer.two_sample("basket", by="arm", relative=True)
    short = r.lift.short
    assert short.startswith("+") and "% (95% CI " in short  # common practice, no source
    assert f"relative change {short}" in str(r)
    assert "Relative change vs old" in html(r)
    row = r.to_frame().iloc[0]
    assert row["lift"] == pytest.approx(r.lift.lift, rel=1e-15)
    assert (row["lift_low"], row["lift_high"]) == pytest.approx(r.lift.ci, rel=1e-15)
    plain = shop.tinfer.two_sample("basket", by="arm")
    assert plain.lift is None and "lift" not in plain.to_frame()
    assert "relative change" not in str(plain)


def test_recompute_keeps_the_lift_at_the_new_level(shop):
    r = shop.tinfer.two_sample("basket", by="arm", relative="log")
    r90 = r.recompute(level=0.9)
    own = r.relative_lift(method="log", level=0.9)
    # reference: the log-scale lift on its own card (core/test_ratio.py checks it against a
    # numerical derivative); a 90% interval is narrower (common practice, no source)
    assert r90.lift.level == 0.9 and r90.lift.method == "log"
    assert r90.lift.ci == pytest.approx(own.ci, rel=1e-15)
    assert r90.lift.ci[1] - r90.lift.ci[0] < r.lift.ci[1] - r.lift.ci[0]


def test_one_sample_from_summary_lift_is_the_interval_over_the_reference():
    r = tinfer.from_summary(n=40, mean=10.4, sd=2.0, null=10.0, relative=True)
    lo, hi = stats.t.interval(0.95, 39, loc=10.4, scale=2.0 / np.sqrt(40))
    # reference: scipy.stats.t.interval, divided by the reference value
    assert r.lift.ci == pytest.approx((lo / 10.0 - 1.0, hi / 10.0 - 1.0), rel=1e-12)


def test_paired_relative_uses_both_columns():
    rng = np.random.default_rng(5)
    after = rng.normal(50.0, 6.0, 25)
    df = pd.DataFrame({"before": after * 1.03 + rng.normal(0.0, 1.0, 25), "after": after})
    r = df.tinfer.paired("before", "after", relative=True)
    assert r.lift.lift == pytest.approx(df["before"].mean() / df["after"].mean() - 1, rel=1e-12)
    assert r.lift.df == 24.0  # n - 1: a - rho b is one sample (Fieller 1954, from memory)
    assert r.lift.ci == pytest.approx(r.relative_lift().ci, rel=1e-15)


def test_compare_relative_adds_lift_columns_equal_to_the_single_tests(shop):
    batch = shop.tinfer.compare("basket", by="arm", within="device", relative=True)
    frame = batch.to_frame()
    assert {"lift", "lift_low", "lift_high"} <= set(frame.columns)
    for _, row in frame.iterrows():
        one = shop[shop["device"] == row["device"]].tinfer.two_sample(
            "basket", by="arm", relative=True
        )
        # reference: the single test's Fieller interval (checked above against brentq)
        assert row["lift"] == pytest.approx(one.lift.lift, rel=1e-12)
        assert (row["lift_low"], row["lift_high"]) == pytest.approx(one.lift.ci, rel=1e-10)
    assert "relative change" in str(batch) and "relative change" in html(batch)
    assert "lift" not in shop.tinfer.compare("basket", by="arm", within="device").to_frame()


@pytest.mark.parametrize(
    "call",
    [
        lambda df: df.tinfer.two_sample("basket", by="arm", relative="percent"),
        lambda df: df.tinfer.two_sample("basket", by="arm", relative=True, trim=0.2),
        lambda df: df.tinfer.compare("basket", relative=True),
        lambda df: tinfer.from_summary(n=30, mean=0.4, sd=1.0, paired=True, relative=True),
    ],
)
def test_relative_refuses_what_it_cannot_answer(shop, call):
    # common practice, no source: a lift needs two means (or a positive reference)
    with pytest.raises(tinfer.TinferError):
        call(shop)


def test_report_tables_show_the_lift_only_where_asked(shop):
    with_lift = shop.tinfer.two_sample("basket", by="arm", relative=True)
    without = shop.tinfer.two_sample("basket", by="arm")
    batch = shop.tinfer.compare("basket", by="arm", within="device", relative=True)
    text = tinfer.table([with_lift, without, batch]).to_markdown()
    assert "| relative change |" in text
    # common practice, no source: the lift is the ratio of the two means minus one
    assert with_lift.lift.short.replace("95% CI ", "").replace("−", "-") in text
    assert "relative change" not in tinfer.table([without]).to_markdown()


def test_relative_from_summaries_sums_and_dask_equals_the_rows(shop):
    dd = pytest.importorskip("dask.dataframe")
    import tinfer.scale.dask  # registers ddf.tinfer

    rows = shop.tinfer.compare("basket", by="arm", within="device", relative=True).to_frame()
    g = shop.assign(sq=shop["basket"] ** 2).groupby(["device", "arm"])
    sums = g.agg(n=("basket", "size"), sum=("basket", "sum"), sum_sq=("sq", "sum"))
    from_sums = tinfer.compare_sums(sums.reset_index(), arm="arm", relative=True).to_frame()
    summaries = g["basket"].agg(n="size", mean="mean", sd="std").reset_index()
    from_summaries = tinfer.compare_summaries(summaries, arm="arm", relative=True).to_frame()
    ddf = dd.from_pandas(shop, npartitions=3)
    on_dask = ddf.tinfer.compare("basket", by="arm", within="device", relative=True).to_frame()
    # reference: the rows path (checked against scipy's brentq inversion above)
    for other in (from_sums, from_summaries, on_dask):
        for col in ("lift", "lift_low", "lift_high"):
            np.testing.assert_allclose(other[col], rows[col], rtol=1e-9)
