"""Shared parameter docs: one text per keyword, filled into every docstring that takes it.

Checked with numpydoc's parser (a general-purpose library): every parameter of the public
entry points is documented, no template slot is left unfilled, and a keyword shared by
several functions reads the same in each (common practice, no source).
"""

from __future__ import annotations

import inspect

import pandas as pd
import pytest
from numpydoc.docscrape import FunctionDoc

import tinfer
from tinfer.docstrings import PARAMS, expand

ACCESSOR = type(pd.DataFrame({"x": [1.0]}).tinfer)
ENTRY_POINTS = {
    "one_sample": ACCESSOR.one_sample,
    "two_sample": ACCESSOR.two_sample,
    "paired": ACCESSOR.paired,
    "compare": ACCESSOR.compare,
    "from_summary": tinfer.from_summary,
    "compare_summaries": tinfer.compare_summaries,
    "plan": tinfer.plan,
}


def _documented(func) -> dict[str, str]:
    """Parameter name -> its description, from the numpydoc Parameters section."""
    out = {}
    for p in FunctionDoc(func)["Parameters"]:
        for name in p.name.split(","):
            out[name.strip()] = " ".join(p.desc)
    return out


@pytest.mark.parametrize("name", ENTRY_POINTS)
def test_every_parameter_is_documented(name):
    """The Parameters section names exactly the function's keywords."""
    func = ENTRY_POINTS[name]
    params = [p for p in inspect.signature(func).parameters if p != "self"]
    assert set(_documented(func)) == set(params)


@pytest.mark.parametrize("name", ENTRY_POINTS)
def test_no_slot_left_unfilled(name):
    """No ``{name}`` line of the template survives in a finished docstring."""
    doc = ENTRY_POINTS[name].__doc__
    assert not any(line.strip().strip("{}") in PARAMS for line in doc.splitlines()
                   if line.strip().startswith("{"))  # fmt: skip


@pytest.mark.parametrize("keyword", ["level", "units", "margin", "worse", "superior", "rate"])
def test_shared_keyword_reads_the_same(keyword):
    """A keyword described by the template has one text wherever it appears (a study plan's
    margin is a planning margin, with words of its own)."""
    texts = {
        name: _documented(func)[keyword]
        for name, func in ENTRY_POINTS.items()
        if keyword in _documented(func) and (name, keyword) != ("plan", "margin")
    }
    assert len(texts) >= 2 and len(set(texts.values())) == 1, texts


def test_words_differ_where_the_design_does():
    """The SD that converts a standardised margin is named per design."""
    sd = {n: _documented(ENTRY_POINTS[n])["margin_units"] for n in ("one_sample", "two_sample")}
    assert "sample SD" in sd["one_sample"] and "pooled SD" in sd["two_sample"]


def test_expand_keeps_indentation():
    """A slot indented by eight spaces gives a parameter at eight and its text at twelve."""
    out = expand("    Parameters\n    ----------\n        {rate}\n")
    lines = out.splitlines()
    assert lines[2].startswith("        rate : float") and lines[3].startswith(" " * 12)
