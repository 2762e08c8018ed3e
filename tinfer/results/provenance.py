"""Provenance of a result: the tinfer version, the time it was computed, a data fingerprint."""

from __future__ import annotations

import datetime as _dt
import hashlib
from collections.abc import Iterable

import numpy as np

#: The package version (``tinfer.__version__``), recorded on every card.
VERSION = "0.1.0"


def versions() -> dict[str, str]:
    """The versions that compute a result: Python, numpy, scipy, pandas and tinfer.

    tinfer's last digits depend on scipy's, so a record without them cannot be re-checked.

    >>> sorted(versions())
    ['numpy', 'pandas', 'python', 'scipy', 'tinfer']
    """
    import platform
    from importlib import metadata

    out = {"tinfer": VERSION, "python": platform.python_version()}
    for name in ("numpy", "scipy", "pandas"):
        try:
            out[name] = metadata.version(name)
        except metadata.PackageNotFoundError:  # pragma: no cover - installed with tinfer
            out[name] = "not installed"
    return out


def versions_text() -> str:
    """The versions as one short line: "tinfer 0.1.0, Python 3.11.7, numpy 2.4.6, ..."."""
    v = versions()
    names = {"tinfer": "tinfer", "python": "Python", "numpy": "numpy", "scipy": "scipy"}
    names["pandas"] = "pandas"
    return ", ".join(f"{names[k]} {v[k]}" for k in ("tinfer", "python", "numpy", "scipy", "pandas"))


def now_iso() -> str:
    """The current UTC time, ISO 8601 to the second."""
    return _dt.datetime.now(_dt.UTC).isoformat(timespec="seconds")


def fingerprint(design: str, samples: Iterable[np.ndarray] | None, summaries: Iterable) -> str:
    """A short blake2b hash of the exact values used (or of the summaries, without values).

    >>> a = fingerprint("one-sample", [np.array([1.0, 2.0])], ())
    >>> len(a), a == fingerprint("one-sample", [np.array([1.0, 2.0])], ())
    (16, True)
    >>> a == fingerprint("one-sample", [np.array([1.0, 2.5])], ())
    False
    """
    h = hashlib.blake2b(digest_size=8)
    h.update(design.encode())
    if samples is not None:
        for arr in samples:
            h.update(np.ascontiguousarray(arr, dtype=np.float64).tobytes())
            h.update(b"|")
    else:
        for s in summaries:
            for v in (s.n, s.mean, s.ssd):
                h.update(np.ascontiguousarray(v, dtype=np.float64).tobytes())
    return h.hexdigest()


def frozen_copy(values) -> np.ndarray:
    """A read-only float64 copy: results own their data and never see later edits.

    >>> a = np.array([1.0, 2.0]); b = frozen_copy(a); a[0] = 9.0
    >>> float(b[0]), b.flags.writeable
    (1.0, False)
    """
    out = np.array(values, dtype=np.float64, copy=True)
    out.setflags(write=False)
    return out


def frozen(values) -> np.ndarray:
    """``values`` as an array marked read-only (no copy: for arrays tinfer made itself)."""
    out = np.asarray(values)
    out.setflags(write=False)
    return out
