"""Shared test setup: makes ``tests/strategies.py`` importable as ``strategies``."""

from __future__ import annotations

import os
import sys
from pathlib import Path

_HERE = str(Path(__file__).parent)
if _HERE not in sys.path:
    sys.path.insert(0, _HERE)

# Property tests explore fresh examples on every local run; under CI they are derandomised
# so that a submission's result does not depend on the draw.
from hypothesis import settings  # noqa: E402

settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")
