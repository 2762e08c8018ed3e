"""Text from users made safe for the chart renderer and for HTML, in one place.

Labels come from users' data: group levels, column names, units, segment values. Some
characters in them break the renderer (vl-convert aborts the whole Python process on most
control characters; a line break inside a label ends an expression string) or the page.
:func:`visible` turns each such character into a visible, harmless form, so a reader can
still see that the label holds one: a C0 control becomes its Unicode control picture
(vertical tab -> ␋), a line break ␤, a tab a space; C1 controls, unpaired surrogates and
noncharacters become the replacement character �. :func:`clean_spec` applies it to every
string (keys too) of a chart spec, at the boundary to the renderer; :func:`shorten` keeps a
very long label from stretching a chart.
"""

from __future__ import annotations

import re
from typing import Any

LINE_BREAK = "\u2424"  # ␤ SYMBOL FOR NEWLINE
REPLACEMENT = "\ufffd"
#: Longest label drawn in a chart; longer ones keep their start and end around an ellipsis.
MAX_LABEL = 60

_BREAKS = {"\n", "\r", "\u2028", "\u2029", "\x85"}
_TABLE = {c: chr(0x2400 + c) for c in range(0x20)}  # control pictures ␀ .. ␟
_TABLE |= {ord(b): LINE_BREAK for b in _BREAKS}
_TABLE |= {0x09: " ", 0x7F: "\u2421"}  # tab, DEL ␡
_TABLE |= {c: REPLACEMENT for c in range(0x80, 0xA0) if c != 0x85}
_TABLE |= {c: REPLACEMENT for c in (*range(0xFDD0, 0xFDF0), 0xFFFE, 0xFFFF)}
_ODD = re.compile(
    "[\x00-\x1f\x7f-\x9f\u2028\u2029\ud800-\udfff\ufdd0-\ufdef\ufffe\uffff]"
    "|[\U0001fffe-\U0001ffff\U0002fffe-\U0002ffff\U0003fffe-\U0003ffff\U000efffe-\U000effff"
    "\U000ffffe-\U000fffff\U0010fffe-\U0010ffff]"
)


def _one(match: re.Match) -> str:
    c = match.group()
    return _TABLE.get(ord(c), REPLACEMENT)


def visible(text: str, keep_lines: bool = False) -> str:
    """``text`` with control characters, line breaks and noncharacters made visible.

    ``keep_lines`` keeps ``\\n``, ``\\r`` and tabs as they are (for HTML text, where they are
    white space).

    Examples
    --------
    >>> visible("fur\\x0brow"), visible("two\\nlines"), visible("tab\\there"), visible("plain")
    ('fur␋row', 'two␤lines', 'tab here', 'plain')
    >>> visible("a\\ufffeb\\x9b"), visible("a\\nb\\x00", keep_lines=True)
    ('a�b�', 'a\\nb␀')
    """
    if not _ODD.search(text):
        return text
    if keep_lines:
        return _ODD.sub(lambda m: m.group() if m.group() in "\n\r\t" else _one(m), text)
    return _ODD.sub(_one, text)


def shorten(text: str, limit: int = MAX_LABEL) -> str:
    """A label of at most ``limit`` characters: its start and end around an ellipsis.

    >>> shorten("x" * 100, 10)
    'xxxxxx…xxx'
    >>> shorten("short")
    'short'
    """
    if len(text) <= limit:
        return text
    tail = max(limit // 3, 1)
    return text[: limit - tail - 1] + "…" + text[-tail:]


def label(value: Any, limit: int = MAX_LABEL) -> str:
    """A user's label as a chart shows it: visible and shortened.

    >>> label("lot\\n7" * 30, 12)
    'lot␤7lo…ot␤7'
    """
    return shorten(visible(str(value)), limit)


def clean_spec(node: Any) -> Any:
    """Every string of a chart spec (keys and values, at any depth) made :func:`visible`.

    >>> clean_spec({"title": "a\\x0bb", "data": {"values": [{"g\\n": "x\\ry"}]}})
    {'title': 'a␋b', 'data': {'values': [{'g␤': 'x␤y'}]}}
    """
    if isinstance(node, str):
        return visible(node)
    if isinstance(node, dict):
        return {clean_spec(k): clean_spec(v) for k, v in node.items()}
    if isinstance(node, list | tuple):
        return [clean_spec(v) for v in node]
    return node
