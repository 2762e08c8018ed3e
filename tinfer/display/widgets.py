"""Interactive explorers: ipywidgets controls that recompute a result and redraw it in place.

``result.explore()``, ``tinfer.tdist(df).explore()`` and ``plan.explore()`` return a small
:class:`ipywidgets.VBox` subclass. Every change of a control recomputes from the numbers the
object already holds (``TResult.recompute`` works from the stored summaries; the caller's
DataFrame is never read again) and replaces the HTML view (card text plus inline SVG chart).

The object currently shown is kept in ``explorer.result``, so code (and tests) can read the
numbers behind the view. ipywidgets is imported on first use, not at ``import tinfer``.

Static exports: an explorer's MIME bundle carries, next to the widget view, the card shown when
it was displayed as ``text/html`` and the result's text as ``text/plain``, so a viewer that
cannot run the widget can still show the numbers. (nbconvert's HTML exporter ranks the widget
view first by default; an offline record should rank ``text/html`` first to show the card.)
"""

from __future__ import annotations

import functools
import html
import math
from typing import TYPE_CHECKING, Any

from .._errors import MissingDependencyError, TinferError

if TYPE_CHECKING:  # pragma: no cover
    import ipywidgets

    from .._tdist import TDistribution
    from ..results import TResult

SIDE_OPTIONS = (("two-sided", "two-sided"), ("upper", "upper"), ("lower", "lower"))
LEVEL_RANGE = (0.5, 0.999)
DF_RANGE = (0.5, 1000.0)
TRIM_RANGE = (0.0, 0.45)
BOUND_RANGE = (-6.0, 6.0)
#: Lower-tail probabilities whose values the t-distribution explorer lists and marks.
TDIST_PERCENTILES = (0.025, 0.05, 0.95, 0.975)
#: Rendered views kept per explorer, so that moving a slider back and forth is instant.
CACHE_SIZE = 64
_LABEL_STYLE = {"description_width": "9em"}
_WIDE = "34em"


def _ipywidgets():
    """Import ipywidgets, or raise a MissingDependencyError that says how to install it."""
    try:
        import ipywidgets
    except ImportError as exc:  # pragma: no cover - exercised only without ipywidgets
        raise MissingDependencyError(
            "Interactive explorers need the 'ipywidgets' package, which is not installed. "
            "Install it with: pip install 'tinfer[display]'"
        ) from exc
    return ipywidgets


def _card_html(obj: Any) -> str:
    """The HTML card of ``obj`` (a result or a t-distribution view), chart included."""
    from .render import html as card

    return card(obj)


def _message_html(text: str) -> str:
    if not text:
        return ""
    return f'<div class="tinfer-explore-message" role="status">⚠ {html.escape(text)}</div>'


def _probe(obj: Any, **options: Any) -> bool:
    """True when ``obj.recompute`` accepts ``options`` (unknown options raise TypeError)."""
    try:
        obj.recompute(**options)
    except TypeError:
        return False
    except TinferError:
        return True  # the option exists; this particular value was refused
    return True


def _slider(w, value: float, lo: float, hi: float, step: float, digits: int, description: str):
    """A labelled FloatSlider that updates on release, in the explorers' common layout."""
    return w.FloatSlider(
        value=value,
        min=lo,
        max=hi,
        step=step,
        readout_format=f".{digits}f",
        description=description,
        continuous_update=False,
        style=_LABEL_STYLE,
        layout=w.Layout(width=_WIDE),
    )


class _ViewCache:
    """A small LRU of rendered views keyed by the options that produced them."""

    def __init__(self, size: int = CACHE_SIZE) -> None:
        self._get = functools.lru_cache(maxsize=size)(self._compute)
        self.compute = None  # set by the explorer: options tuple -> (object, html)

    def _compute(self, key: tuple):
        return self.compute(dict(key))

    def __call__(self, options: dict[str, Any]):
        return self._get(tuple(sorted(options.items(), key=lambda kv: kv[0])))


@functools.cache
def _classes():
    """Build the explorer classes once ipywidgets is importable (they subclass its VBox)."""
    w = _ipywidgets()

    class Explorer(w.VBox):
        """Base explorer: a VBox whose view is an HTML widget, with a static HTML fallback."""

        def _static_html(self) -> str:
            return self.view.value

        def _static_text(self) -> str:
            return str(self.result)

        def _repr_mimebundle_(self, **kwargs):
            data = super()._repr_mimebundle_(**kwargs)
            if data is None:  # closed widget
                return None
            data = dict(data)
            data["text/plain"] = self._static_text()
            data["text/html"] = self._static_html()
            return data

        def _show(self, options: dict[str, Any]) -> None:
            """Recompute with ``options`` and replace the view; refusals show as a message."""
            try:
                obj, view = self._cache(options)
            except TinferError as exc:
                self.message.value = _message_html(str(exc))
                return
            except Exception as exc:  # a drawing problem must not freeze the controls
                self.message.value = _message_html(
                    f"Could not redraw ({type(exc).__name__}: {exc}); the numbers shown are "
                    "those of the last working settings."
                )
                return
            self.result = obj
            self.message.value = ""
            self.view.value = view

        def _wire(self, controls) -> None:
            for c in controls:
                c.observe(self._on_change, names="value")

        def _on_change(self, change=None) -> None:
            self._show(self.options())

    # ------------------------------------------------------------------ results
    class ResultExplorer(Explorer):
        """Sliders for level, side and null (and margin, trim, pooling where they apply)."""

        def __init__(self, result: TResult, **kwargs) -> None:
            self.base = result
            self.result = result
            self._cache = _ViewCache()
            self._cache.compute = self._render
            self.level = _slider(
                w, result.level, LEVEL_RANGE[0], LEVEL_RANGE[1], 0.001, 3, "confidence level"
            )
            self.side = w.ToggleButtons(
                options=SIDE_OPTIONS,
                value=result.side,
                description="alternative",
                style=_LABEL_STYLE | {"button_width": "7em"},
                layout=w.Layout(width=_WIDE),
            )
            self.null = w.FloatText(
                value=result.null,
                description="null value",
                style=_LABEL_STYLE,
                layout=w.Layout(width="22em"),
            )
            controls: list[Any] = [self.level, self.side, self.null]  # observed
            rows: list[Any] = list(controls)  # shown
            self.pooled = None
            if result.design == "two-sample" and _probe(result, pooled=result.pooled):
                self.pooled = w.Checkbox(
                    value=bool(result.pooled),
                    description="pooled variance (equal-variance t)",
                    indent=False,
                    layout=w.Layout(width=_WIDE),
                )
                controls.append(self.pooled)
                rows.append(self.pooled)
            self.margin = None
            eq = getattr(result, "equivalence", None)
            if eq is not None and _probe(result, margin=eq.margin):
                sd_units = " (SD)" if eq.margin_units == "standardised" else ""
                if isinstance(eq.margin, tuple):
                    # An asymmetric band: offsets below and above null (one below 0).
                    self.margin = w.HBox(
                        [
                            w.BoundedFloatText(
                                value=float(v),
                                min=lo,
                                max=hi,
                                step=_margin_step(abs(float(v))),
                                description=words + sd_units,
                                style=_LABEL_STYLE,
                                layout=w.Layout(width="17em"),
                            )
                            for v, lo, hi, words in (
                                (eq.margin[0], -1e300, 0.0, "margin below"),
                                (eq.margin[1], 0.0, 1e300, "above"),
                            )
                        ]
                    )
                    controls.extend(self.margin.children)
                else:
                    self.margin = w.BoundedFloatText(
                        value=float(eq.margin),
                        min=0.0,
                        max=1e300,
                        step=_margin_step(float(eq.margin)),
                        description=("margin ±" if eq.worse is None else "margin") + sd_units,
                        style=_LABEL_STYLE,
                        layout=w.Layout(width="22em"),
                    )
                    controls.append(self.margin)
                rows.append(self.margin)
            self.trim = None
            trim = getattr(result, "trim", None)
            has_values = getattr(result, "samples", None) is not None
            if trim is not None and has_values and _probe(result, trim=float(trim)):
                self.trim = _slider(
                    w, float(trim), TRIM_RANGE[0], TRIM_RANGE[1], 0.01, 2, "trim fraction"
                )
                controls.append(self.trim)
                rows.append(self.trim)
            self.message = w.HTML(value="")
            self.view = w.HTML(value=_card_html(result))
            super().__init__(children=(*rows, self.message, self.view), **kwargs)
            self.add_class("tinfer-explorer")
            if self.pooled is not None and self.trim is not None:
                # Yuen's test does not pool: offer pooling only without trimming.
                self.pooled.disabled = self.trim.value > 0 and not self.pooled.value
                self.trim.observe(self._pooling_allowed, names="value")
            self._wire(controls)

        def _pooling_allowed(self, change) -> None:
            self.pooled.disabled = change["new"] > 0 and not self.pooled.value

        def options(self) -> dict[str, Any]:
            """The recompute options the controls currently ask for."""
            opts: dict[str, Any] = {
                "level": float(self.level.value),
                "side": self.side.value,
                "null": float(self.null.value),
            }
            if self.pooled is not None:
                opts["pooled"] = bool(self.pooled.value)
            if isinstance(self.margin, w.HBox):
                opts["margin"] = tuple(float(c.value) for c in self.margin.children)
            elif self.margin is not None:
                opts["margin"] = float(self.margin.value)
            if self.trim is not None:
                opts["trim"] = float(self.trim.value)
            return opts

        def _render(self, options: dict[str, Any]):
            new = self.base.recompute(**options)
            return new, _card_html(new)

    # ------------------------------------------------------------------ t distribution
    class TDistExplorer(Explorer):
        """Sliders for df (or the normal) and for the bounds of a shaded area.

        ``result`` is the :class:`~tinfer._tdist.TDistView` shown (distribution, bounds,
        percentiles); ``area`` its shaded area.
        """

        def __init__(self, distribution: TDistribution, **kwargs) -> None:
            self.result = distribution.show()
            self._cache = _ViewCache()
            self._cache.compute = self._render
            is_normal = math.isinf(distribution.df)
            df0 = 30.0 if is_normal else distribution.df
            self.df = w.FloatLogSlider(
                value=df0,
                base=10,
                min=min(math.log10(DF_RANGE[0]), math.floor(100 * math.log10(df0)) / 100),
                max=max(math.log10(DF_RANGE[1]), math.ceil(100 * math.log10(df0)) / 100),
                step=0.01,
                readout_format=".3g",
                description="df",
                disabled=is_normal,
                continuous_update=False,
                style=_LABEL_STYLE,
                layout=w.Layout(width=_WIDE),
            )
            self.normal = w.Checkbox(value=is_normal, description="normal (df = ∞)", indent=False)
            self.bounds = w.FloatRangeSlider(
                value=(-2.0, 2.0),
                min=BOUND_RANGE[0],
                max=BOUND_RANGE[1],
                step=0.01,
                readout_format=".2f",
                description="shade from, to",
                continuous_update=False,
                style=_LABEL_STYLE,
                layout=w.Layout(width=_WIDE),
            )
            self.region = w.ToggleButtons(
                options=(
                    ("between", "between"),
                    ("below the first", "below"),
                    ("above the second", "above"),
                ),
                value="between",
                description="shaded area",
                style=_LABEL_STYLE | {"button_width": "9em"},
            )
            self.area = float("nan")
            controls = [self.df, self.normal, self.bounds, self.region]
            self.message = w.HTML(value="")
            self.view = w.HTML(value="")
            super().__init__(children=(*controls, self.message, self.view), **kwargs)
            self.add_class("tinfer-explorer")
            self.normal.observe(self._toggle_normal, names="value")
            self._wire(controls)
            self._show(self.options())

        def _toggle_normal(self, change) -> None:
            self.df.disabled = bool(change["new"])

        def options(self) -> dict[str, Any]:
            """df, low and high as the controls currently ask for (None for an open bound)."""
            lo, hi = (float(v) for v in self.bounds.value)
            region = self.region.value
            return {
                "df": math.inf if self.normal.value else float(self.df.value),
                "low": None if region == "below" else (hi if region == "above" else lo),
                "high": None if region == "above" else (lo if region == "below" else hi),
            }

        def _show(self, options: dict[str, Any]) -> None:
            super()._show(options)
            self.area = self.result.area

        def _render(self, options: dict[str, Any]):
            from .._tdist import tdist

            view = tdist(options["df"]).show(
                low=options["low"], high=options["high"], percentiles=TDIST_PERCENTILES
            )
            return view, _card_html(view)

    # ------------------------------------------------------------------ plans
    class PlanExplorer(Explorer):
        """Sliders for the plan's given quantities (effect, n, power), level and ratio."""

        def __init__(self, plan_result, **kwargs) -> None:
            from .._errors import ParameterError

            if plan_result.is_grid:
                raise ParameterError(
                    "explore() needs a single plan; this one is a grid over "
                    f"{', '.join(plan_result.grid)}. Pick one row and plan it again."
                )
            self.base = plan_result
            self.result = plan_result
            self._cache = _ViewCache()
            self._cache.compute = self._render
            p = plan_result
            self.equivalence = p.margin is not None
            controls: list[Any] = []
            self.effect = None
            if p.solved != "effect":
                e = float(p.effect)
                if self.equivalence:
                    lo, hi = -2.0, 2.0
                elif p.side == "lower" or e < 0:
                    lo, hi = min(-2.0, 1.25 * e), -0.01
                else:
                    lo, hi = 0.01, max(2.0, 1.25 * e)
                self.effect = _slider(w, e, lo, hi, 0.01, 2, "effect (SD units)")
                controls.append(self.effect)
            self.n = None
            if p.solved != "n":
                self.n = w.BoundedIntText(
                    value=int(p.n),
                    min=2,
                    max=10**7,
                    description=_N_WORDS[p.design],
                    style=_LABEL_STYLE,
                    layout=w.Layout(width="22em"),
                )
                controls.append(self.n)
            self.power = None
            if p.solved != "power":
                self.power = _slider(
                    w,
                    float(p.target if p.target is not None else p.power),
                    0.5,
                    0.99,
                    0.01,
                    2,
                    "power",
                )
                controls.append(self.power)
            self.level = _slider(
                w, p.level, LEVEL_RANGE[0], LEVEL_RANGE[1], 0.001, 3, "confidence level"
            )
            controls.append(self.level)
            self.ratio = None
            if p.design == "two-sample":
                self.ratio = w.FloatLogSlider(
                    value=p.ratio,
                    base=2,
                    min=-2,
                    max=2,
                    step=0.05,
                    readout_format=".3g",
                    description="ratio n2 / n1",
                    continuous_update=False,
                    style=_LABEL_STYLE,
                    layout=w.Layout(width=_WIDE),
                )
                controls.append(self.ratio)
            self.message = w.HTML(value="")
            self.view = w.HTML(value=plan_view_html(p))
            super().__init__(children=(*controls, self.message, self.view), **kwargs)
            self.add_class("tinfer-explorer")
            self._wire(controls)

        def options(self) -> dict[str, Any]:
            """The keywords of ``tinfer.plan`` that the controls currently ask for."""
            p = self.base
            opts: dict[str, Any] = {"level": float(self.level.value)}
            if self.effect is not None:
                opts["effect"] = float(self.effect.value)
            if self.n is not None:
                opts["n"] = int(self.n.value)
            if self.power is not None:
                opts["power"] = float(self.power.value)
            if self.ratio is not None:
                opts["ratio"] = float(self.ratio.value)
            if self.equivalence:
                opts["margin"] = tuple(p.margin)
            else:
                opts["side"] = p.side
            if p.sd is not None:
                opts["sd"] = p.sd
            return opts

        def _render(self, options: dict[str, Any]):
            from .._plan import plan

            design = ("equivalence-" if self.equivalence else "") + self.base.design
            new = plan(design, **options)
            return new, plan_view_html(new)

    return {"result": ResultExplorer, "tdist": TDistExplorer, "plan": PlanExplorer}


_N_WORDS = {"one-sample": "n", "paired": "pairs", "two-sample": "n (first group)"}


def plan_view_html(plan_result) -> str:
    """HTML for the plan explorer: the plan's card, which embeds its power curve as SVG.

    Examples
    --------
    >>> import tinfer
    >>> text = plan_view_html(tinfer.plan("two-sample", effect=0.5, power=0.8))
    >>> "64" in text and text.count("<svg") == 1
    True
    """
    return plan_result._repr_mimebundle_()["text/html"]


def _margin_step(m: float) -> float:
    return float(10 ** math.floor(math.log10(m) - 1)) if m > 0 else 0.1


def explore_result(result: TResult) -> ipywidgets.VBox:
    """An explorer for a t-test result: level, side and null (and margin/trim/pooling).

    Parameters
    ----------
    result : TResult
        The result to start from; it is recomputed from its stored summaries on every change.

    Returns
    -------
    ipywidgets.VBox
        With the controls as attributes (``level``, ``side``, ``null``, ``pooled``,
        ``margin``, ``trim``; ``None`` where they do not apply), the HTML ``view`` and the
        result currently shown as ``result``.

    Examples
    --------
    >>> import tinfer
    >>> r = tinfer.from_summary(n=20, mean=10.4, sd=1.5, null=10)
    >>> ex = explore_result(r)
    >>> ex.level.value = 0.9
    >>> ex.result.level
    0.9
    """
    return _classes()["result"](result)


def explore_tdist(distribution: TDistribution) -> ipywidgets.VBox:
    """An explorer for the t distribution: df (or the normal) and a shaded area.

    Examples
    --------
    >>> import tinfer
    >>> ex = explore_tdist(tinfer.tdist(12))
    >>> ex.bounds.value = (-1.0, 2.0)
    >>> round(ex.area, 6)
    0.797148
    """
    return _classes()["tdist"](distribution)


def explore_plan(plan_result) -> ipywidgets.VBox:
    """An explorer for a single study plan: the given quantities, level and ratio.

    The quantity the plan solved for (n, power or effect) is solved again on every change.

    Examples
    --------
    >>> import tinfer
    >>> ex = explore_plan(tinfer.plan("two-sample", effect=0.5, power=0.8))
    >>> ex.effect.value = 0.8
    >>> ex.result.n
    26
    """
    return _classes()["plan"](plan_result)
