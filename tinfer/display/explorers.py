"""The explorer widgets: ipywidgets controls that recompute an object and redraw its card.

This module imports ipywidgets when it is imported; :mod:`tinfer.display.widgets` imports it
only once ipywidgets is known to be there, so ``import tinfer`` never needs ipywidgets.
Every explorer recomputes from the numbers its object already holds (``recompute``; the
caller's DataFrame is never read again) and keeps the object shown in ``result``.
"""

from __future__ import annotations

import math
from typing import Any

from ..errors import ParameterError, TinferError
from ..optional import require
from ..results.plan import PlanResult
from ..results.tdist import TDistribution
from ..results.ttest import TResult
from .controls import (
    BOUND_RANGE,
    DF_RANGE,
    LABEL_STYLE,
    LEVEL_RANGE,
    N_WORDS,
    SIDE_OPTIONS,
    TDIST_PERCENTILES,
    TRIM_RANGE,
    WIDE,
    ViewCache,
    card_html,
    margin_step,
    message_html,
    plan_view_html,
    probe,
)

w = require("ipywidgets", "interactive explorers")


def slider(value: float, lo: float, hi: float, step: float, digits: int, description: str):
    """A labelled FloatSlider that updates on release, in the explorers' common layout.

    The range widens to hold ``value``, so a result made with a level or trim beyond the
    usual range starts where it was made instead of being clamped, with the digits it needs.
    """
    while digits < 6 and round(value, digits) != value:
        digits += 1
    step = min(step, 10.0**-digits)
    return w.FloatSlider(
        value=value,
        min=min(lo, value),
        max=max(hi, value),
        step=step,
        readout_format=f".{digits}f",
        description=description,
        continuous_update=False,
        style=LABEL_STYLE,
        layout=w.Layout(width=WIDE),
    )


class Explorer(w.VBox):
    """Base explorer: a VBox whose view is an HTML widget, with a static HTML fallback.

    Each explorer defines ``options()`` (the current settings of its controls, a dict) and
    ``_render(options)`` (the result and its card for those settings); the base calls them.
    """

    def _start(self, controls: list, rows: list) -> None:
        """Lay out ``rows``, the message line and the view; watch ``controls``."""
        self._cache = ViewCache(self._render)
        self.message = w.HTML(value="")
        self.view = w.HTML(value="")
        self.children = (*rows, self.message, self.view)
        self.add_class("tinfer-explorer")
        for c in controls:
            c.observe(self._on_change, names="value")

    def _repr_mimebundle_(self, **kwargs):
        data = super()._repr_mimebundle_(**kwargs)
        if data is None:  # closed widget
            return None
        data = dict(data)
        data["text/plain"] = str(self.result)
        data["text/html"] = self.view.value
        return data

    def _show(self, options: dict[str, Any]) -> None:
        """Recompute with ``options`` and replace the view; refusals show as a message."""
        try:
            obj, view = self._cache(options)
        except TinferError as exc:
            self.message.value = message_html(str(exc))
            return
        except Exception as exc:  # a drawing problem must not freeze the controls
            self.message.value = message_html(
                f"Could not redraw ({type(exc).__name__}: {exc}); the numbers shown are "
                "those of the last working settings."
            )
            return
        self.result = obj
        self.message.value = ""
        self.view.value = view

    def _on_change(self, change=None) -> None:
        self._show(self.options())


class ResultExplorer(Explorer):
    """Sliders for level, side and null (and margin, trim, pooling where they apply)."""

    def __init__(self, result: TResult, **kwargs) -> None:
        super().__init__(**kwargs)
        self.base = self.result = result
        self.level = slider(
            result.level, LEVEL_RANGE[0], LEVEL_RANGE[1], 0.001, 3, "confidence level"
        )
        self.side = w.ToggleButtons(
            options=SIDE_OPTIONS,
            value=result.side,
            description="alternative",
            style=LABEL_STYLE | {"button_width": "7em"},
            layout=w.Layout(width=WIDE),
        )
        self.null = w.FloatText(
            value=result.null,
            description="null value",
            style=LABEL_STYLE,
            layout=w.Layout(width="22em"),
        )
        self.pooled = self._pooled_control(result)
        self.margin = self._margin_control(result)
        self.trim = self._trim_control(result)
        rows = [self.level, self.side, self.null]
        rows += [c for c in (self.pooled, self.margin, self.trim) if c is not None]
        controls = [c for c in rows if c is not self.margin]
        if isinstance(self.margin, w.HBox):
            controls += list(self.margin.children)
        elif self.margin is not None:
            controls.append(self.margin)
        self._start(controls, rows)
        self.view.value = card_html(result)
        if self.pooled is not None and self.trim is not None:
            # Yuen's test does not pool: offer pooling only without trimming.
            self.pooled.disabled = self.trim.value > 0 and not self.pooled.value
            self.trim.observe(self._pooling_allowed, names="value")

    @staticmethod
    def _pooled_control(result: TResult):
        if result.design != "two-sample" or not probe(result, pooled=result.pooled):
            return None
        return w.Checkbox(
            value=bool(result.pooled),
            description="pooled variance (equal-variance t)",
            indent=False,
            layout=w.Layout(width=WIDE),
        )

    @staticmethod
    def _margin_control(result: TResult):
        eq = result.equivalence
        if eq is None or not probe(result, margin=eq.margin):
            return None
        sd_units = " (SD)" if eq.margin_units == "standardised" else ""
        if isinstance(eq.margin, tuple):
            # An asymmetric band: offsets below and above null (one below 0).
            boxes = [
                w.BoundedFloatText(
                    value=float(v),
                    min=lo,
                    max=hi,
                    step=margin_step(abs(float(v))),
                    description=words + sd_units,
                    style=LABEL_STYLE,
                    layout=w.Layout(width="17em"),
                )
                for v, lo, hi, words in (
                    (eq.margin[0], -1e300, 0.0, "margin below"),
                    (eq.margin[1], 0.0, 1e300, "above"),
                )
            ]
            return w.HBox(boxes)
        return w.BoundedFloatText(
            value=float(eq.margin),
            min=0.0,
            max=1e300,
            step=margin_step(float(eq.margin)),
            description=("margin ±" if eq.worse is None else "margin") + sd_units,
            style=LABEL_STYLE,
            layout=w.Layout(width="22em"),
        )

    @staticmethod
    def _trim_control(result: TResult):
        if result.samples is None or not probe(result, trim=float(result.trim)):
            return None
        return slider(float(result.trim), TRIM_RANGE[0], TRIM_RANGE[1], 0.01, 2, "trim fraction")

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
        return new, card_html(new)


class TDistExplorer(Explorer):
    """Sliders for df (or the normal) and for the bounds of a shaded area.

    ``result`` is the :class:`~tinfer.TDistView` shown (distribution, bounds, percentiles);
    ``area`` its shaded area.
    """

    def __init__(self, distribution: TDistribution, **kwargs) -> None:
        super().__init__(**kwargs)
        self.result = distribution.show()
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
            style=LABEL_STYLE,
            layout=w.Layout(width=WIDE),
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
            style=LABEL_STYLE,
            layout=w.Layout(width=WIDE),
        )
        self.region = w.ToggleButtons(
            options=(
                ("between", "between"),
                ("below the first", "below"),
                ("above the second", "above"),
            ),
            value="between",
            description="shaded area",
            style=LABEL_STYLE | {"button_width": "9em"},
        )
        self.area = float("nan")
        controls = [self.df, self.normal, self.bounds, self.region]
        self._start(controls, controls)
        self.normal.observe(self._toggle_normal, names="value")
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
        view = TDistribution(options["df"]).show(
            low=options["low"], high=options["high"], percentiles=TDIST_PERCENTILES
        )
        return view, card_html(view)


class PlanExplorer(Explorer):
    """Sliders for the plan's given quantities (effect, n, power), level and ratio."""

    def __init__(self, plan_result: PlanResult, **kwargs) -> None:
        if plan_result.is_grid:
            raise ParameterError(
                "explore() needs a single plan; this one is a grid over "
                f"{', '.join(plan_result.grid)}. Pick one row and plan it again."
            )
        super().__init__(**kwargs)
        p = self.base = self.result = plan_result
        self.equivalence = p.margin is not None
        self.effect = self._effect_control(p) if p.solved != "effect" else None
        self.n = None
        if p.solved != "n":
            self.n = w.BoundedIntText(
                value=int(p.n),
                min=2,
                max=10**7,
                description=N_WORDS[p.design],
                style=LABEL_STYLE,
                layout=w.Layout(width="22em"),
            )
        self.power = None
        if p.solved != "power":
            start = float(p.target if p.target is not None else p.power)
            self.power = slider(start, 0.5, 0.99, 0.01, 2, "power")
        self.level = slider(p.level, LEVEL_RANGE[0], LEVEL_RANGE[1], 0.001, 3, "confidence level")
        self.ratio = None
        if p.design == "two-sample":
            self.ratio = w.FloatLogSlider(
                value=p.ratio,
                base=2,
                min=-2,
                max=2,
                step=0.05,
                readout_format=".3g",
                description="group 2 size per 1",
                continuous_update=False,
                style=LABEL_STYLE,
                layout=w.Layout(width=WIDE),
            )
        controls = [self.effect, self.n, self.power, self.level, self.ratio]
        controls = [c for c in controls if c is not None]
        self._start(controls, controls)
        self.view.value = plan_view_html(p)

    def _effect_control(self, p: PlanResult):
        e = float(p.effect)
        if self.equivalence:
            lo, hi = -2.0, 2.0
        elif p.side == "lower" or e < 0:
            lo, hi = min(-2.0, 1.25 * e), -0.01
        else:
            lo, hi = 0.01, max(2.0, 1.25 * e)
        return slider(e, lo, hi, 0.01, 2, "effect (SD units)")

    def options(self) -> dict[str, Any]:
        """The inputs of the plan that the controls currently ask for."""
        opts: dict[str, Any] = {"level": float(self.level.value)}
        if self.effect is not None:
            opts["effect"] = float(self.effect.value)
        if self.n is not None:
            opts["n"] = int(self.n.value)
        if self.power is not None:
            opts["power"] = float(self.power.value)
        if self.ratio is not None:
            opts["ratio"] = float(self.ratio.value)
        return opts

    def _render(self, options: dict[str, Any]):
        new = self.base.recompute(**options)
        return new, plan_view_html(new)
