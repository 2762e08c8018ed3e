"""Build every output of a result, and sort what happened into the classes the docs list.

Used by tests/test_hostile.py, in the test process and in a subprocess (run as a script)
so that an abort of the chart renderer shows as a failed test, not as a crashed run.

Classes: "result" (every output built, charts drawn), "degraded" (every output built, a
card says its chart could not be drawn), "clear error" (a TinferError), and "bug"
(anything else: an exception of another kind, or a warning from numpy).
"""

from __future__ import annotations

import json
import sys
import warnings
from collections import Counter
from collections.abc import Callable

import numpy as np
import pandas as pd

import tinfer
from tinfer.display.charts import to_svg

NOTE = "The chart could not be drawn"


def render_everything(obj, deep: bool = True) -> bool:
    """Every output of ``obj`` (and, when ``deep``, of its checks and its explorer); True
    when some card lost its chart."""
    degraded = False
    pages = []
    str(obj), repr(obj)
    bundle = obj._repr_mimebundle_()
    assert set(bundle) == {"text/plain", "text/html"}, "the card is missing"
    pages.append(bundle["text/html"])
    if hasattr(obj, "to_html"):
        pages.append(obj.to_html())
    if hasattr(obj, "chart"):
        to_svg(obj.chart())
    if deep and hasattr(obj, "explore") and not getattr(obj, "is_grid", False):
        ex = obj.explore()
        pages.append(ex._repr_mimebundle_()["text/html"])
    if deep and getattr(obj, "samples", None) is not None:
        for make in (obj.check, lambda: obj.bootstrap(n_resamples=99, seed=1)):
            try:
                extra = make()
            except tinfer.TinferError:
                continue
            degraded |= render_everything(extra)
    return degraded or any(NOTE in p for p in pages)


def outcome(build: Callable[[], object], deep: bool = True) -> str:
    """The class of what building and rendering a result gave (see the module docstring)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        warnings.simplefilter("ignore", tinfer.SmallSegmentWarning)
        try:
            obj = build()
        except tinfer.TinferError:
            return "clear error"
        except Exception as exc:
            return f"bug at build: {type(exc).__name__}: {exc}"[:300]
        try:
            return "degraded" if render_everything(obj, deep) else "result"
        except tinfer.TinferError:
            return "clear error"
        except Exception as exc:
            return f"bug at render: {type(exc).__name__}: {exc}"[:300]


VALUES = [5.2, 4.8, 6.1, 4.1, 4.4, 3.9]


def places(label: str) -> dict[str, Callable[[], object]]:
    """Every place a user's text reaches a result: levels, columns, units, names, segments."""
    df = pd.DataFrame({"kg": VALUES, "plot": ["drip"] * 3 + [label] * 3})
    seg = pd.DataFrame({"kg": VALUES * 2, "arm": ["a", "b"] * 6, "s": [label] * 6 + ["x"] * 6})
    return {
        "group level": lambda: df.tinfer.two_sample("kg", by="plot"),
        "column name": lambda: pd.DataFrame({label: VALUES}).tinfer.one_sample(label, null=4),
        "units": lambda: df.tinfer.one_sample("kg", null=4.5, units=label, margin=1.0),
        "names": lambda: tinfer.from_summary(
            n=(5, 6), mean=(1.0, 2.0), sd=(1.0, 1.5), variable=label, labels=(label, "b")
        ),
        "segment": lambda: seg.tinfer.compare("kg", by="arm", within="s"),
    }


def corpus(c1: bool = False, every: int = 1) -> list[str]:
    """Nasty characters inside a label (C1 controls apart), and nasty whole labels."""
    from strategies import NASTY_CHARS, NASTY_LABELS

    chars = [c for c in NASTY_CHARS if ("\x80" <= c <= "\x9f") == c1][::every]
    return [f"fur{c}row" for c in chars] + ([] if c1 else NASTY_LABELS)


def cases():
    """(place, label, build, deep): every nasty label as a group level, rendered in full
    (card, chart, explorer, checks, bootstrap); C1 controls as group levels, and a sample of
    the rest in every other place, card and chart only."""
    for label in corpus():
        yield "group level", label, places(label)["group level"], True
    for label in corpus(c1=True):
        yield "group level", label, places(label)["group level"], False
    for label in corpus(every=5):
        for place, build in places(label).items():
            if place != "group level":
                yield place, label, build, False


def main() -> int:
    """Run every case; print the count of each outcome (and any bug) as JSON."""
    counts: Counter = Counter()
    bugs = []
    for place, label, build, deep in cases():
        result = outcome(build, deep)
        counts[result if not result.startswith("bug") else "bug"] += 1
        if result.startswith("bug"):
            bugs.append(f"{place} {label[:30]!r}: {result}")
    print(json.dumps({"counts": counts, "bugs": bugs[:20]}))
    return 0


if __name__ == "__main__":
    np.seterr(all="warn")
    sys.exit(main())
