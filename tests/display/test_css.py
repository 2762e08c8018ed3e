"""The card stylesheet, checked by a small parser instead of by eye.

A missing comma or semicolon in CSS fails silently in the browser (a fallback colour is lost,
a rule is dropped), so these tests lint the file: braces balance, declarations end with ';',
every JupyterLab variable has a fallback, class selectors carry our prefix, dark themes are
handled in CSS alone. Rules checked are common practice for CSS, no source.
"""

from __future__ import annotations

import re
from importlib.resources import files

import pytest

from tinfer.display.html import css, minify

CSS = files("tinfer.display").joinpath("static", "tinfer.css").read_text(encoding="utf-8")


def _strip_comments(text: str) -> str:
    return re.sub(r"/\*.*?\*/", "", text, flags=re.S)


def _blocks(text: str) -> list[tuple[str, str]]:
    """(prelude, body) pairs, recursing into at-rules such as @media; raises on bad braces."""
    out: list[tuple[str, str]] = []
    i = 0
    n = len(text)
    while i < n:
        j = text.find("{", i)
        if j < 0:
            if text[i:].strip():
                raise ValueError(f"text outside any rule: {text[i:].strip()[:40]!r}")
            break
        prelude = text[i:j].strip()
        if "}" in prelude or ";" in prelude:
            raise ValueError(f"stray character before {prelude[-40:]!r}")
        depth, k = 1, j + 1
        while k < n and depth:
            depth += {"{": 1, "}": -1}.get(text[k], 0)
            k += 1
        if depth:
            raise ValueError(f"unclosed block after {prelude!r}")
        body = text[j + 1 : k - 1]
        if prelude.startswith("@"):
            out.extend(_blocks(body))
        else:
            out.append((prelude, body))
        i = k
    return out


RULES = _blocks(_strip_comments(CSS))


# ---------------------------------------------------------------------------- structure
def test_braces_balance():
    """Every opening brace has its closing brace (counted outside comments)."""
    text = _strip_comments(CSS)
    depth = 0
    for ch in text:
        depth += {"{": 1, "}": -1}.get(ch, 0)
        assert depth >= 0
    assert depth == 0
    assert len(RULES) > 20


def test_parser_rejects_broken_css():
    """The checker itself fails on an unclosed block, so the tests above can fail."""
    with pytest.raises(ValueError):
        _blocks(".tinfer-card { color: red;")


def test_every_declaration_ends_with_semicolon():
    """Inside every rule, the text after the last ';' is empty, and each piece is 'a: b'."""
    for prelude, body in RULES:
        assert "{" not in body, prelude
        pieces = body.split(";")
        assert pieces[-1].strip() == "", f"missing ';' in {prelude}: {pieces[-1].strip()!r}"
        for decl in pieces[:-1]:
            prop, colon, value = decl.partition(":")
            assert colon and prop.strip() and value.strip(), f"bad declaration in {prelude}"


def test_checker_catches_missing_semicolon():
    """A rule whose last declaration lacks ';' is caught by the same check."""
    ((_, body),) = _blocks(".tinfer-x { color: red; margin: 0 }")
    assert body.split(";")[-1].strip() != ""


# ---------------------------------------------------------------------------- variables
def test_every_jupyterlab_variable_has_a_fallback():
    """Each var(--jp-...) is followed by a comma and a non-empty fallback value."""
    uses = re.findall(r"var\(\s*--jp-[\w-]+\s*(.)", CSS)
    assert uses, "the stylesheet should follow JupyterLab's theme variables"
    assert set(uses) == {","}
    assert not re.search(r"var\(\s*--jp-[\w-]+\s*,\s*\)", CSS)


def test_variable_names_snapshot():
    """The colour and font variables the card defines (a snapshot: renames are deliberate)."""
    defined = set(re.findall(r"(--tinfer-[\w-]+)\s*:", CSS))
    assert defined == {
        "--tinfer-ink",
        "--tinfer-ink-soft",
        "--tinfer-paper",
        "--tinfer-panel",
        "--tinfer-rule",
        "--tinfer-font",
        "--tinfer-mono",
        "--tinfer-size",
        "--tinfer-accent",
        "--tinfer-accent-wash",
        "--tinfer-curve",
        "--tinfer-observed",
        "--tinfer-verdict-out",
        "--tinfer-verdict-out-wash",
        "--tinfer-verdict-in",
        "--tinfer-verdict-in-wash",
        "--tinfer-note",
        "--tinfer-note-wash",
    }
    used = set(re.findall(r"var\((--tinfer-[\w-]+)\)", CSS))
    assert used <= defined, used - defined


def test_jupyterlab_variables_mapped():
    """The theme-following variables take JupyterLab's values first (snapshot of the map)."""
    light = dict(RULES)[".tinfer-card"]
    mapping = dict(re.findall(r"(--tinfer-[\w-]+)\s*:\s*var\((--jp-[\w-]+)", light))
    assert mapping == {
        "--tinfer-ink": "--jp-content-font-color0",
        "--tinfer-ink-soft": "--jp-content-font-color2",
        "--tinfer-paper": "--jp-layout-color0",
        "--tinfer-panel": "--jp-layout-color2",
        "--tinfer-rule": "--jp-border-color2",
        "--tinfer-font": "--jp-content-font-family",
        "--tinfer-mono": "--jp-code-font-family",
        "--tinfer-size": "--jp-content-font-size1",
    }


# ---------------------------------------------------------------------------- selectors
def test_class_selectors_are_prefixed():
    """Every class named in a selector starts with 'tinfer-' (no clash with other outputs)."""
    classes = set()
    for prelude, _ in RULES:
        classes.update(re.findall(r"\.(-?[A-Za-z_][\w-]*)", prelude))
    assert classes
    assert {c for c in classes if not c.startswith("tinfer-")} == set()


def test_dark_theme_selectors_present():
    """Dark themes switch by CSS alone: JupyterLab's attribute and the OS preference."""
    preludes = [p for p, _ in RULES]
    assert 'body[data-jp-theme-light="false"] .tinfer-card' in preludes
    assert re.search(r"@media\s*\(prefers-color-scheme:\s*dark\)", CSS)
    assert 'body:not([data-jp-theme-light="true"]) .tinfer-card' in preludes


def test_dark_blocks_redefine_the_same_variables():
    """Both dark blocks set the same variables, so neither theme path misses a colour."""
    bodies = dict(RULES)
    a = set(
        re.findall(
            r"(--tinfer-[\w-]+)\s*:", bodies['body[data-jp-theme-light="false"] .tinfer-card']
        )
    )
    b = set(
        re.findall(
            r"(--tinfer-[\w-]+)\s*:", bodies['body:not([data-jp-theme-light="true"]) .tinfer-card']
        )
    )
    assert a == b and "--tinfer-ink" in a


def test_fallback_hidden_and_rich_part_revealed():
    """The text fallback is hidden and the rich part overrides its inline display:none."""
    bodies = dict(RULES)
    assert "display: none;" in bodies[".tinfer-text-fallback"]
    assert "display: block !important;" in bodies[".tinfer-rich"]


def test_no_network_resources():
    """No @import, @font-face or url(): the card never fetches fonts or files."""
    low = CSS.lower()
    assert "@import" not in low and "@font-face" not in low and "url(" not in low


def test_loaded_once_through_importlib_resources():
    """render.css() returns the packaged file, minified, from a one-entry cache."""
    assert css() == minify(CSS)
    assert css() is css()
    assert css.cache_info().maxsize == 1


def test_minified_css_keeps_every_rule():
    """Minifying keeps the same rules and declarations (parsed before and after)."""

    def norm(rules):
        return [(re.sub(r"\s+", " ", p), re.sub(r"\s+", "", b)) for p, b in rules]

    assert norm(_blocks(css())) == norm(RULES)
    assert "/*" not in css() and "\n" not in css()
