"""Errors: what tinfer refuses, and that each message says what came and what to do.

Every deliberate error is a tinfer.TinferError and so also a ValueError (the design's
rule, borrowed from common practice in Python libraries).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import tinfer


def _frame() -> pd.DataFrame:
    return pd.DataFrame(
        {
            "yield_kg": [5.2, 4.8, 6.1, 5.5, 4.1, 4.4, 3.9, 4.6, 5.0],
            "plot_type": [
                "drip",
                "drip",
                "drip",
                "drip",
                "furrow",
                "furrow",
                "furrow",
                "furrow",
                "flood",
            ],
            "site": ["n", "s", "e", "w", "n", "s", "e", "w", "n"],
        }
    )


def _raises(match: str):
    """Both base classes at once: TinferError (which is a ValueError)."""
    return pytest.raises(tinfer.TinferError, match=match)


class TestColumns:
    def test_missing_column_names_close_matches(self):
        """A misspelt column name is refused and the close match is suggested."""
        with _raises(r"no column 'yeild_kg'.*Did you mean 'yield_kg'") as info:
            _frame().tinfer.one_sample("yeild_kg")
        assert isinstance(info.value, ValueError)

    def test_missing_column_without_match_lists_columns(self):
        """With nothing close, the available columns are listed."""
        with _raises(r"Available columns: 'yield_kg', 'plot_type', 'site'"):
            _frame().tinfer.one_sample("zzz")

    def test_non_numeric_column(self):
        """A text column is refused with its dtype and a way out (pd.to_numeric)."""
        with _raises(r"'site' has dtype .*not numbers.*pd.to_numeric"):
            _frame().tinfer.one_sample("site")

    def test_boolean_column(self):
        """A boolean column is not taken as numbers."""
        df = pd.DataFrame({"ok": [True, False, True]})
        with _raises("not numbers"):
            df.tinfer.one_sample("ok")


class TestGroups:
    def test_more_than_two_levels_lists_them(self):
        """A by column with three levels and no groups lists the levels found, sorted."""
        with _raises(r"3 level\(s\) \('drip', 'flood', 'furrow'\).*groups=\(first, second\)"):
            _frame().tinfer.two_sample("yield_kg", by="plot_type")

    def test_single_level(self):
        """A by column with one level is refused the same way."""
        df = _frame().iloc[:4]
        with _raises(r"1 level\(s\) \('drip'\)"):
            df.tinfer.two_sample("yield_kg", by="plot_type")

    def test_absent_level(self):
        """groups naming an absent level says so and lists the levels found."""
        with _raises(r"Level 'sprinkler' does not occur.*'drip', 'flood', 'furrow'"):
            _frame().tinfer.two_sample("yield_kg", by="plot_type", groups=("drip", "sprinkler"))

    def test_fewer_than_two_values_after_dropping(self):
        """A group left with one value after dropping missing ones is refused (and named)."""
        df = _frame()
        df.loc[df.plot_type == "furrow", "yield_kg"] = np.array([4.1, np.nan, np.nan, np.nan])
        with _raises(r"'furrow' has 1 usable value\(s\) after dropping missing"):
            df.tinfer.two_sample("yield_kg", by="plot_type", groups=("drip", "furrow"))

    def test_one_sample_too_few(self):
        """One usable value cannot give a one-sample t."""
        with _raises(r"1 usable value\(s\)"):
            pd.DataFrame({"x": [3.0, np.nan]}).tinfer.one_sample("x")


class TestValues:
    def test_no_spread_one_sample(self):
        """All values equal: the message says there is no spread."""
        with _raises("no spread"):
            pd.DataFrame({"x": [2.5] * 6}).tinfer.one_sample("x", null=2)

    def test_no_spread_two_sample(self):
        """Constant values within both groups: no spread."""
        df = pd.DataFrame({"x": [1.0, 1.0, 3.0, 3.0], "g": list("aabb")})
        with _raises("no spread"):
            df.tinfer.two_sample("x", by="g")

    def test_no_spread_paired(self):
        """Identical differences in a paired test: no spread."""
        df = pd.DataFrame({"a": [1.0, 2.0, 3.0], "b": [0.5, 1.5, 2.5]})
        with _raises("no spread"):
            df.tinfer.paired("a", "b")

    @pytest.mark.parametrize("bad", [np.inf, -np.inf])
    def test_infinite_values(self, bad):
        """Infinite values are refused (not silently dropped), with a remedy."""
        with _raises("infinite value"):
            pd.DataFrame({"x": [1.0, 2.0, bad, 4.0]}).tinfer.one_sample("x")
        df = pd.DataFrame({"a": [1.0, 2.0, 3.0], "b": [0.5, bad, 2.0]})
        with _raises("infinite value"):
            df.tinfer.paired("a", "b")


class TestPairedLong:
    def _long(self):
        return pd.DataFrame(
            {
                "score": [7.0, 8.5, 6.0, 7.5, 9.0, 8.0],
                "visit": ["first", "second"] * 3,
                "unit": ["u1", "u1", "u2", "u2", "u3", "u3"],
            }
        )

    def test_duplicated_subject(self):
        """A subject twice under one condition is named."""
        df = pd.concat(
            [self._long(), pd.DataFrame({"score": [5.0], "visit": ["first"], "unit": ["u2"]})]
        )
        with _raises(r"Subject\(s\) 'u2' appear more than once under 'visit' = 'first'"):
            df.tinfer.paired("score", by="visit", subject="unit")

    def test_unmatched_subject(self):
        """A subject present under one condition only is named, with its condition."""
        df = self._long().iloc[:-1]
        with _raises(r"Unmatched subjects: 'u3' only under 'first'"):
            df.tinfer.paired("score", by="visit", subject="unit")

    def test_missing_subject_id(self):
        """Rows without a subject id are refused, not paired with each other (was: paired)."""
        df = self._long()
        df.loc[[4, 5], "unit"] = None  # common practice, no source: a missing id is no id
        with _raises(r"Column 'unit' has 1 missing subject id\(s\) under 'visit' = 'first'"):
            df.tinfer.paired("score", by="visit", subject="unit")


class TestParameters:
    def test_level_message_shape(self):
        """level=1.5 gives exactly the one message shape."""
        with pytest.raises(tinfer.ParameterError) as info:
            _frame().tinfer.two_sample(
                "yield_kg", by="plot_type", groups=("drip", "furrow"), level=1.5
            )
        assert str(info.value) == (
            "The 'level' parameter of two_sample must be a float in (0, 1). Got 1.5 instead."
        )
        assert isinstance(info.value, ValueError)

    @pytest.mark.parametrize("level", [0, 1, -0.2, 95, "0.95", True])
    def test_level_outside_unit_interval(self, level):
        """0, 1, negatives, percentages, strings and booleans are not levels."""
        with _raises("'level' parameter of one_sample must be a float in"):
            _frame().tinfer.one_sample("yield_kg", level=level)

    @pytest.mark.parametrize("side", ["greater", "two_sided", "both", None])
    def test_unknown_side(self, side):
        """An unknown side lists the three accepted ones."""
        with _raises(r"'side' parameter of paired must be one of 'two-sided', 'upper', 'lower'"):
            pd.DataFrame({"a": [1.0, 2.0, 4.0], "b": [1.5, 1.0, 2.0]}).tinfer.paired(
                "a", "b", side=side
            )

    def test_error_hierarchy(self):
        """ParameterError and DataError are TinferErrors and ValueErrors."""
        for cls in (tinfer.ParameterError, tinfer.DataError):
            assert issubclass(cls, tinfer.TinferError) and issubclass(cls, ValueError)
