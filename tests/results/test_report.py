"""Sentences and report tables, checked as text against published worked examples.

Sources: Student's (1908) sleep data, as in tests/analyses/test_from_summary.py (ten paired
differences, mean 1.58 h, SD 1.229995, t = 4.0621 on 9 df, p = 0.002833, 95% CI 0.700 to
2.460; from memory); the d_z interval from scipy.stats.nct (reference library) inverted by
scipy.optimize.brentq. Markdown tables are parsed with markdown-it-py (in the docs tool chain);
LaTeX fragments are compiled with Debian's pdflatex where it is installed.
"""

from __future__ import annotations

import math
import shutil
import subprocess
from html.parser import HTMLParser

import numpy as np
import pandas as pd
import pytest
from scipy import optimize, stats

import tinfer
from tinfer.results import report

SLEEP = dict(n=10, mean=1.58, sd=1.229995483, paired=True, labels=("drug 2", "drug 1"))


def _sleep():
    return tinfer.from_summary(**SLEEP, variable="extra sleep", units="h")


def _dz_interval(t: float, df: float, n: int, level: float = 0.95) -> tuple[float, float]:
    """d_z limits: the noncentralities whose t distribution puts t at 1 - a/2 and a/2
    (scipy.stats.nct, reference library), over sqrt(n)."""
    a = 1 - level

    def root(p):
        return optimize.brentq(lambda nc: stats.nct.cdf(t, df, nc) - p, -50, 50, xtol=1e-14)

    return root(1 - a / 2) / math.sqrt(n), root(a / 2) / math.sqrt(n)


class TestSentences:
    def test_plain_sentence_of_the_sleep_data(self):
        """Every number from the published example (CI, t, df, p) or from scipy (d_z CI)."""
        r = _sleep()
        lo, hi = _dz_interval(4.0621, 9, 10)
        want = (
            "The mean of the paired differences in extra sleep (drug 2 minus drug 1) was "
            "1.58 h (95% CI 0.70 h to 2.46 h); t = 4.06 on 9 df, p = 0.00283; "
            f"d_z 1.28 (95% CI {lo:.2f} to {hi:.2f})."
        )
        assert r.sentence() == want

    def test_compact_sentence_of_the_sleep_data(self):
        r = _sleep()
        lo, hi = _dz_interval(4.0621, 9, 10)
        want = (
            "M_diff = 1.58 h, 95% CI [0.70 h, 2.46 h], t(9) = 4.06, p = 0.00283, "
            f"d_z = 1.28, 95% CI [{lo:.2f}, {hi:.2f}]"
        )
        assert r.sentence("compact") == want

    def test_equivalence_sentence_reports_the_tost_p(self):
        """The TOST p is the larger one-sided p (Schuirmann 1987), here from scipy.stats.t."""
        r = tinfer.from_summary(
            n=(24, 24), mean=(10.2, 10.0), sd=(0.9, 1.1), margin=1.0, labels=("new", "old")
        )
        se = math.sqrt(0.9**2 / 24 + 1.1**2 / 24)
        df = r.df
        p = max(stats.t.sf((0.2 + 1.0) / se, df), stats.t.cdf((0.2 - 1.0) / se, df))
        assert f"two one-sided tests, p = {p:.3g}" in r.sentence()
        assert f"p = {p:.3g}, 90% CI" in r.sentence("compact")
        assert "t_lower(" in r.sentence("compact") and "t_upper(" in r.sentence("compact")

    def test_pooled_reading_example_compact(self):
        """Moore and McCabe's reading example as in test_from_summary (t = 2.27, 42 df,
        one-sided p = 0.014; from memory)."""
        drp = dict(n=(21, 23), mean=(51.48, 41.52), sd=(11.01, 17.15), labels=("new", "old"))
        r = tinfer.from_summary(**drp, side="upper", pooled=True)
        text = r.sentence("compact")
        assert "t(42) = 2.27, p = 0.014" in text

    def test_pairwise_bayes_and_plan_sentences(self):
        g = pd.DataFrame(
            {"y": [5.1, 4.9, 5.3, 5.0, 6.2, 6.0, 6.4, 6.1, 5.2, 5.4, 5.0, 5.3],
             "k": ["a"] * 4 + ["b"] * 4 + ["c"] * 4}
        )  # fmt: skip
        pw = g.tinfer.pairwise("y", by="k")
        assert pw.sentence().startswith(pw.headline())
        assert "b minus a" in pw.sentence() and "p_adj" in pw.sentence("compact")
        b = _sleep().bayes_factor()
        assert "Cauchy prior" in b.sentence() and b.sentence("compact").startswith("BF10 = ")
        p = tinfer.plan("two-sample", effect=0.5, power=0.8)
        # 64 per group for d = 0.5 at 80% power (Cohen 1988, Table 2.4.1; from memory)
        assert p.sentence("compact").startswith("n = 64 and 64 for power")

    def test_bad_style(self):
        with pytest.raises(tinfer.ParameterError, match="'plain' or 'compact'"):
            _sleep().sentence("fancy")


class _Cells(HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)


def _three_kinds():
    single = _sleep()
    g = pd.DataFrame(
        {"y": [5.1, 4.9, 5.3, 5.0, 6.2, 6.0, 6.4, 6.1, 5.2, 5.4, 5.0, 5.3],
         "k": ["a"] * 4 + ["b"] * 4 + ["c & d_%"] * 4}
    )  # fmt: skip
    pw = g.tinfer.pairwise("y", by="k")
    rng = np.random.default_rng(4)
    shops = pd.DataFrame(
        {"shop": np.repeat(["north", "south"], 20), "arm": np.tile(["x", "y"], 20),
         "sales": rng.normal(10, 1, 40)}
    )  # fmt: skip
    batch = shops.tinfer.compare("sales", by="arm", within="shop")
    return single, pw, batch


class TestTable:
    def test_rows_and_note(self):
        single, pw, batch = _three_kinds()
        t = tinfer.table([single, pw, batch])
        assert len(t.rows) == 1 + 3 + 2
        assert "Paired t test" in t.note and "Games-Howell" in t.note and "Holm" in t.note
        assert "adjusted p" in t.headers
        assert t.frame.shape[0] == 6

    def test_markdown_parses_as_one_table(self):
        markdown_it = pytest.importorskip("markdown_it")
        t = tinfer.table(list(_three_kinds()))
        tokens = markdown_it.MarkdownIt().enable("table").parse(t.to_markdown())
        kinds = [tok.type for tok in tokens]
        assert kinds.count("table_open") == 1
        assert kinds.count("th_open") == len(t.headers)
        assert kinds.count("td_open") == len(t.headers) * len(t.rows)
        assert "\u2212" not in t.to_markdown()  # ASCII minus in Markdown

    def test_html_is_a_table_without_scripts(self):
        t = tinfer.table(list(_three_kinds()))
        parser = _Cells()
        parser.feed(t.to_html())
        assert parser.tags.count("tr") == 1 + len(t.rows)
        assert "script" not in parser.tags
        assert "c &amp; d_%" in t.to_html()

    def test_latex_escapes_and_compiles(self, tmp_path):
        t = tinfer.table(list(_three_kinds()))
        tex = t.to_latex()
        assert r"c \& d\_\%" in tex and "\u2212" not in tex
        assert tex.count(r"\\") == 1 + len(t.rows)
        engine = shutil.which("pdflatex")
        if engine is None:
            pytest.skip("no TeX engine (Debian's texlive-latex-base provides pdflatex)")
        doc = tmp_path / "t.tex"
        doc.write_text(
            "\\documentclass{article}\\usepackage[T1]{fontenc}\\usepackage[utf8]{inputenc}"
            "\\begin{document}\n" + tex + "\n\\end{document}\n",
            encoding="utf-8",
        )
        run = subprocess.run(
            [engine, "-interaction=nonstopmode", "-halt-on-error", doc.name],
            cwd=tmp_path,
            capture_output=True,
            text=True,
            timeout=120,
        )
        assert run.returncode == 0, run.stdout[-2000:]
        assert (tmp_path / "t.pdf").stat().st_size > 1000

    def test_columns(self):
        t = tinfer.table(_sleep(), columns=["comparison", "p"])
        assert t.headers == ("comparison", "p")
        with pytest.raises(tinfer.ParameterError):
            tinfer.table(_sleep(), columns=["nope"])
        with pytest.raises(TypeError, match=r"tinfer\.table takes"):
            tinfer.table([tinfer.plan("paired", effect=0.5, power=0.8)])


def test_every_result_type_exports():
    """Markdown, LaTeX and HTML from every result type (the key-value form where a type is
    not a table of tests)."""
    single, pw, batch = _three_kinds()
    raw = pd.DataFrame({"h": [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0]})
    raw_result = raw.tinfer.one_sample("h")
    objs = [
        single,
        pw,
        batch,
        raw_result.check(),
        raw_result.bootstrap(999, seed=1),
        single.bayes_factor(),
        tinfer.plan("two-sample", effect=0.5, power=0.8),
    ]
    for o in objs:
        md, tex, page = o.to_markdown(), o.to_latex(), o.to_html(chart=False)
        assert md.startswith("| ") and "\n|---" in md
        assert tex.startswith(r"\begin{tabular}") and r"\end{tabular}" in tex
        assert page.startswith('<div class="tinfer-card">')


def test_value_text():
    assert report.value_text(float("nan")) == "n/a"
    assert report.plain_minus("\u22121.5 to \u221e") == "-1.5 to inf"
