"""Optional packages, imported when a feature first needs them, with an install hint.

The one place where tinfer imports an optional dependency (altair, vl-convert, ipywidgets,
the notebook tools): ``import tinfer`` needs only numpy, scipy and pandas.
"""

from __future__ import annotations

import importlib
from types import ModuleType

from .errors import MissingDependencyError

#: Module name -> (name on PyPI, the tinfer extra that installs it).
PACKAGES = {
    "altair": ("altair", "display"),
    "vl_convert": ("vl-convert-python", "display"),
    "ipywidgets": ("ipywidgets", "display"),
    "nbclient": ("nbclient", "dev"),
    "nbformat": ("nbformat", "dev"),
    "nbconvert": ("nbconvert", "dev"),
}


def require(module: str, feature: str) -> ModuleType:
    """Import ``module``, or raise a MissingDependencyError saying how to install it.

    ``feature`` names what needs the package ("charts", "interactive explorers").

    Examples
    --------
    >>> require("altair", "charts").__name__
    'altair'
    >>> try:
    ...     require("no_such_module_here", "time travel")
    ... except ImportError as exc:
    ...     print(str(exc).replace(". ", ".\\n"))
    The 'no_such_module_here' package is needed for time travel and is not installed.
    Install it with: pip install 'no_such_module_here'
    """
    try:
        return importlib.import_module(module)
    except ImportError as exc:
        pip_name, extra = PACKAGES.get(module, (module, None))
        target = f"tinfer[{extra}]" if extra else pip_name
        raise MissingDependencyError(
            f"The {pip_name!r} package is needed for {feature} and is not installed. "
            f"Install it with: pip install '{target}'"
        ) from exc
