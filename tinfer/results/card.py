"""What every result type shares for showing itself: its HTML card and the Jupyter bundle.

The card is built by :mod:`tinfer.display` on demand, inside these methods.
"""

from __future__ import annotations


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

    def _repr_mimebundle_(self, include=None, exclude=None) -> dict[str, str]:
        from ..display.render import mimebundle

        return mimebundle(self, text=self.plain_text())
