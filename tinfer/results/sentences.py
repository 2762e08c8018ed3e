"""The sentences of a t result: the question tested, the verdict, the headline, the text form.

One place for the words of :class:`~tinfer.TResult`, so that the card, the text form and the
headline say the same thing: the question is the test actually run (two-sided, one-sided,
equivalence, non-inferiority, trimmed), and the verdict answers it without double negatives.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from .format import fmt_df, fmt_fixed, fmt_level, fmt_num, p_equals
from .lift import SHORT_NAMES
from .words import capital, interval_words

if TYPE_CHECKING:  # pragma: no cover
    from .ttest import TResult

SIDE_WORDS = {"two-sided": "two-sided", "upper": "one-sided (upper)", "lower": "one-sided (lower)"}


def quantity(r: TResult) -> str:
    """What the estimate is, in words: "mean of fill_g", "difference in mean kg (a minus b)"."""
    if r.design == "one-sample":
        return f"{r.location} of {r.variable}"
    if r.design == "paired":
        return f"{r.location} of the paired differences in {r.variable} ({r.comparison})"
    return f"difference in {r.location} {r.variable} ({r.comparison})"


def alpha_words(r: TResult) -> str:
    """The significance level in words: "the 5% level"."""
    return f"the {fmt_level(1.0 - r.level)} level"


def question(r: TResult) -> str:
    """The question the test answers, as one sentence ending in a question mark.

    Examples
    --------
    >>> import tinfer
    >>> question(tinfer.from_summary(n=12, mean=5.4, sd=1.1, null=5.0, variable="fill_g"))
    'Does the mean of fill_g differ from 5.00? Two-sided, at the 5% level.'
    >>> question(tinfer.from_summary(n=(9, 9), mean=(5, 4), sd=(1, 1), labels=("new", "old"),
    ...                              variable="kg", side="upper"))
    'Is the difference in mean kg (new minus old) above 0.00? One-sided (upper), at the 5% level.'
    """
    eq = r.equivalence
    if eq is not None:
        if eq.lower is not None and eq.upper is not None:
            where = f"between {r.fmt(eq.low)} and {r.fmt(eq.high)}"
            how = "Two one-sided tests, each"
        elif eq.lower is not None:
            where, how = f"above {r.fmt(eq.low)}", "One-sided"
        else:
            where, how = f"below {r.fmt(eq.high)}", "One-sided"
        return f"Is the {quantity(r)} {where}? {how} at the {fmt_level(eq.alpha)} level."
    target = r.fmt(r.null)
    if r.side == "two-sided":
        if r.design == "two-sample" and r.null == 0:
            a, b = r.labels[0], r.labels[1]
            ask = f"Does the {r.location} {r.variable} differ between {a} and {b}?"
        else:
            ask = f"Does the {quantity(r)} differ from {target}?"
    else:
        where = "above" if r.side == "upper" else "below"
        ask = f"Is the {quantity(r)} {where} {target}?"
    return f"{ask} {capital(SIDE_WORDS[r.side])}, at {alpha_words(r)}."


def verdict(r: TResult) -> str:
    """The answer to :func:`question`, in plain words and without double negatives."""
    eq = r.equivalence
    if eq is not None:
        return eq.conclusion
    short = {"one-sample": r.location, "paired": f"{r.location} difference"}.get(
        r.design, "difference"
    )
    if r.side == "two-sided":
        target = "" if r.design != "one-sample" and r.null == 0 else f" from {r.fmt(r.null)}"
        if r.significant:
            return f"the data show a difference{target}"
        return f"no difference{target} detected at {alpha_words(r)}"
    where = "above" if r.side == "upper" else "below"
    if r.significant:
        return f"the data show the {short} {where} {r.fmt(r.null)}"
    return f"the {short} is not shown {where} {r.fmt(r.null)} at {alpha_words(r)}"


def headline(r: TResult) -> str:
    """One sentence: the estimate with the interval that matches the decision, and the
    verdict with its p-value."""
    if r.design == "one-sample":
        lead = f"The {r.location} of {r.variable} is {r.fmt(r.estimate)}"
    elif r.design == "paired":
        lead = (
            f"Paired differences in {r.variable} ({r.comparison}) average {r.fmt(r.estimate)}"
            + (f" ({r.location})" if r.trim else "")
        )
    else:
        lead = (
            f"The difference in {r.location} {r.variable}, {r.labels[0]} minus "
            f"{r.labels[1]}, is {r.fmt(r.estimate)}"
        )
    eq = r.equivalence
    if eq is not None:
        label = {"equivalence": "TOST"}.get(eq.kind, eq.kind)
        return (
            f"{lead} ({eq.interval_words(r.fmt)}); {eq.conclusion} "
            f"({label} {p_equals(eq.p, eq.log_p)})."
        )
    interval = interval_words(*r.ci, r.fmt, r.level)
    return f"{lead} ({interval}); {verdict(r)} ({p_equals(r.p, r.log_p)})."


def test_line(r: TResult) -> str:
    """The test's statistic, df and p in one line: "t 4.560 on 21.55 df, p = 0.000161"."""
    return f"t {fmt_fixed(r.t, 3)} on {fmt_df(r.df)} df, {p_equals(r.p, r.log_p)}"


def group_line(r: TResult, g, decimals: int) -> str:
    """One group's descriptives: n, missing values dropped, mean and SD (trimmed ones when
    the result is a trimmed-means test)."""
    miss = f", {g.n_missing} missing dropped" if g.n_missing else ""
    if g.trimmed_mean is not None:
        centre = (
            f"{r.location} {fmt_num(g.trimmed_mean, decimals)}, "
            f"winsorised SD {fmt_num(g.winsorised_sd, decimals)}"
        )
    else:
        centre = f"mean {fmt_num(g.mean, decimals)}, SD {fmt_num(g.sd, decimals)}"
    return f"{g.label}: n {g.n}{miss}, {centre}"


def text_lines(r: TResult) -> list[str]:
    """The plain-text form: headline first, then the question, the numbers and the groups."""
    ask = question(r)
    lines = [r.headline(), f"Question tested: {ask[:1].lower()}{ask[1:]}"]
    interval = interval_words(*r.ci, r.fmt, r.level)
    if r.equivalence is not None:
        lines += ["  " + line for line in r.equivalence.text_lines(r.fmt)]
        lines.append(f"  estimate {r.fmt(r.estimate)}, SE {fmt_num(r.se, r.decimals)}")
        lines.append(
            f"  for reference, the ordinary {SIDE_WORDS[r.side]} test against "
            f"{r.fmt(r.null)}: {test_line(r)}; {interval}"
        )
    else:
        lines.append(f"  {r.method}: {test_line(r)}")
        lines.append(f"  estimate {r.fmt(r.estimate)}, SE {fmt_num(r.se, r.decimals)}, {interval}")
    lines.append(f"  {r.effect}")
    if r.lift is not None:
        lift = r.lift
        lines.append(
            f"  relative change {lift.short}, {SHORT_NAMES[lift.method]}; "
            f"{lift.reference} is the base"
        )
    lines += ["  " + group_line(r, g, r.decimals) for g in r.groups]
    lines.extend(f"  note: {w}" for w in r.warnings)
    return lines
