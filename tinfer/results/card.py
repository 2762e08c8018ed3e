"""What every result type shares for showing itself: its HTML card and the Jupyter bundle.

The card is built by :mod:`tinfer.display` on demand, inside these methods.
"""

from __future__ import annotations


class Reported:
    """Mixin for results that are tables of tests (one t result, a pairwise family): their
    report table is :func:`tinfer.table` of themselves, and they write their own sentence."""

    def report_table(self):
        """This result as rows of :func:`tinfer.table` (with its note line)."""
        from .table import table

        return table([self])

    def sentence(self, style: str = "plain") -> str:
        """The result in one sentence, ready to paste.

        ``style="plain"`` (the default) puts the answer in words first; ``"compact"`` follows
        the convention common in journals: statistic with its df in parentheses, p, effect
        size with its interval.
        """
        from . import report

        return report.sentence_of(self, report.check_style(style))


class Card:
    """Mixin: ``to_html()`` and ``_repr_mimebundle_`` for a result type.

    The plain text of the bundle is :meth:`plain_text` (``str`` of the result unless a type
    says otherwise).
    """

    def plain_text(self) -> str:
        """The text shown where HTML cannot be (and inside the card, for viewers without CSS)."""
        return str(self)

    def to_html(self, chart: bool = True) -> str:
        """The HTML card as a string (the same as the notebook shows), for reports and files.

        Self-contained: the stylesheet is inlined, the chart is inline SVG (``chart=False``
        leaves it out), and there is no JavaScript.

        Examples
        --------
        >>> import tinfer
        >>> page = tinfer.plan("two-sample", effect=0.5, power=0.8).to_html(chart=False)
        >>> page.startswith('<div class="tinfer-card">') and "<script" not in page
        True
        """
        from ..display.render import html

        return html(self, chart=chart)

    def report_table(self):
        """This result as a :class:`~tinfer.results.table.ReportTable`: the table of
        :func:`tinfer.table` for t results, batches and pairwise families; for other types
        one row per number of ``to_dict()``."""
        from . import report
        from .table import ReportTable

        numbers = self.to_dict() if hasattr(self, "to_dict") else {}
        rows = tuple(
            (str(k), report.value_text(v)) for k, v in numbers.items() if v not in (None, ())
        )
        return ReportTable(("quantity", "value"), rows, type(self).__name__, None)

    def to_markdown(self) -> str:
        """The result as a Markdown table with a note line (ASCII minus signs).

        Examples
        --------
        >>> import tinfer
        >>> print(tinfer.from_summary(n=10, mean=2.0, sd=1.0).to_markdown().splitlines()[0])
        | comparison | estimate | CI | t | df | p | effect size | effect CI | n |
        """
        return self.report_table().to_markdown()

    def to_latex(self) -> str:
        """The result as a LaTeX ``tabular`` fragment with a note line (ASCII minus signs)."""
        return self.report_table().to_latex()

    def _repr_mimebundle_(self, include=None, exclude=None) -> dict[str, str]:
        from ..display.render import mimebundle

        return mimebundle(self, text=self.plain_text())
