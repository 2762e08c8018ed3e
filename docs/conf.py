"""Sphinx configuration for the tinfer documentation."""

project = "tinfer"
author = "the tinfer developers"
copyright = "2026, the tinfer developers"

extensions = [
    "myst_parser",
    "sphinx.ext.autodoc",
    "sphinx.ext.autosummary",
    "sphinx.ext.mathjax",
    "numpydoc",
]
source_suffix = {".md": "markdown", ".rst": "restructuredtext"}
myst_enable_extensions = ["dollarmath"]
numpydoc_show_class_members = False
numpydoc_validation_checks = set()
autodoc_typehints = "none"
exclude_patterns = ["_build"]
html_theme = "alabaster"
suppress_warnings = ["myst.header"]
nitpicky = False
