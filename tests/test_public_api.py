"""The public surface: ``tinfer.__all__`` lists exactly the public names."""

from __future__ import annotations

import inspect

import tinfer


def _public_defined_here() -> set[str]:
    """Non-underscore attributes of tinfer that are functions or classes defined by tinfer."""
    names = set()
    for name, obj in vars(tinfer).items():
        if name.startswith("_"):
            continue
        if inspect.isfunction(obj) or inspect.isclass(obj):
            if getattr(obj, "__module__", "").split(".")[0] == "tinfer":
                names.add(name)
    return names


class TestAll:
    def test_every_public_function_and_class_is_listed(self):
        """Each public tinfer function or class appears in __all__."""
        missing = _public_defined_here() - set(tinfer.__all__)
        assert not missing, f"public but not in __all__: {sorted(missing)}"

    def test_every_listed_name_exists(self):
        """Each name in __all__ is an attribute of the package."""
        absent = [n for n in tinfer.__all__ if not hasattr(tinfer, n)]
        assert not absent

    def test_no_duplicates_and_no_module_names(self):
        """__all__ has no duplicate and lists no submodule."""
        assert len(tinfer.__all__) == len(set(tinfer.__all__))
        assert not [n for n in tinfer.__all__ if inspect.ismodule(getattr(tinfer, n))]

    def test_listed_names_are_public_objects(self):
        """Apart from __version__, __all__ holds functions and classes from tinfer."""
        listed = set(tinfer.__all__) - {"__version__"}
        assert listed == _public_defined_here()
        assert isinstance(tinfer.__version__, str)

    def test_star_import(self):
        """from tinfer import * brings in exactly __all__."""
        ns: dict = {}
        exec("from tinfer import *", ns)
        assert set(ns) - {"__builtins__"} == set(tinfer.__all__)

    def test_accessor_registered(self):
        """import tinfer registers .tinfer on DataFrame and Series."""
        import pandas as pd

        assert hasattr(pd.DataFrame({"x": [1.0]}), "tinfer")
        assert hasattr(pd.Series([1.0]), "tinfer")
