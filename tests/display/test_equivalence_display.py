"""Display pieces for margin claims: the card section and the chart layers."""

from __future__ import annotations

import pytest
from scipy import stats

import tinfer
from tinfer.display import equivalence as deq


@pytest.fixture
def two_sided():
    return tinfer.from_summary(
        n=(14, 12), mean=(20.3, 20.0), sd=(1.1, 1.6), margin=1.5, labels=("<ridge>", "flat")
    )


@pytest.fixture
def one_sided():
    return tinfer.from_summary(n=25, mean=500.3, sd=1.0, null=500, margin=0.5, worse="lower")


# ---------------------------------------------------------------------------- card_section
class TestCardSection:
    def test_lists_both_tests_and_conclusion(self, two_sided):
        """The section shows each one-sided t and p and the conclusion in words."""
        html = deq.card_section(two_sided)
        eq = two_sided.equivalence
        minus = {ord("-"): "\u2212"}  # our rule: a real minus sign
        assert f"{eq.lower.t:.3f}".translate(minus) in html
        assert f"{eq.upper.t:.3f}".translate(minus) in html
        assert "equivalent within ±1.5" in html
        assert html.count("<tr>") == 3  # header row and the two tests

    def test_escapes_labels(self, two_sided):
        """A group named <ridge> shows escaped, never as markup."""
        html = deq.card_section(two_sided)
        assert "&lt;ridge&gt;" in html and "<ridge>" not in html

    def test_one_sided_claim_lists_one_test(self, one_sided):
        """Non-inferiority lists only the test against the finite limit."""
        assert deq.card_section(one_sided).count("<tr>") == 2

    def test_empty_without_margin(self):
        """A result without a margin claim adds no section and no text lines."""
        r = tinfer.from_summary(n=10, mean=1.0, sd=1.0)
        assert deq.card_section(r) == "" and r.equivalence is None


# ---------------------------------------------------------------------------- density_parts
class TestDensityParts:
    def test_shaded_tails_have_the_one_sided_ps(self, two_sided):
        """The shaded areas are the tails whose areas are the one-sided ps (scipy reference)."""
        eq = two_sided.equivalence
        L = 50.0  # wide enough that no t is clamped
        (lo_a, lo_b), (up_a, up_b) = deq.density_parts(two_sided, L)["shade"]
        area_lower = stats.t.cdf(lo_b, eq.lower.df) - stats.t.cdf(lo_a, eq.lower.df)
        area_upper = stats.t.cdf(up_b, eq.upper.df) - stats.t.cdf(up_a, eq.upper.df)
        assert area_lower == pytest.approx(eq.lower.p, rel=1e-6, abs=1e-15)
        assert area_upper == pytest.approx(eq.upper.p, rel=1e-6, abs=1e-15)


# ---------------------------------------------------------------------------- band_layers
class TestBandLayers:
    def test_band_and_interval_values(self, two_sided):
        """The band layer spans the margin; the interval layer is the 1 - 2 alpha CI."""
        eq = two_sided.equivalence
        band, ci = deq.band_layers(two_sided, (-5.0, 5.0))
        assert band["data"]["values"] == [{"b_lo": -1.5, "b_hi": 1.5}]
        assert ci["data"]["values"] == [{"c_lo": eq.ci[0], "c_hi": eq.ci[1]}]

    def test_infinite_limit_drawn_to_edge(self, one_sided):
        """A one-sided band runs to the panel edge."""
        band, _ = deq.band_layers(one_sided, (498.0, 503.0))
        assert band["data"]["values"] == [{"b_lo": 499.5, "b_hi": 503.0}]


# ---------------------------------------------------------------------------- equivalence_spec
class TestEquivalenceSpec:
    def test_renders_to_svg_offline(self, two_sided):
        """The spec renders with vl-convert and names the one-sided tails."""
        from tinfer.display.charts import to_svg

        svg = to_svg(deq.equivalence_spec(two_sided))
        assert svg.startswith("<svg") and "one tail per one-sided test" in svg
