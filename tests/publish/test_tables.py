"""Tables for papers (zoo.publish.tables) and ``zoo find --format markdown|latex``.

References: GitHub-flavoured Markdown tables (GFM spec, "Tables (extension)": header row,
delimiter row, pipes escaped as \\|); the LaTeX special characters of "LaTeX: A Document
Preparation System" (Lamport, 2nd ed., §2.2.1 and appendix C.1.1: # $ % & ~ _ ^ \\ { });
the number of reachable markings A * C(alpha+beta, alpha) / (alpha+beta) of a cycloid
(docs/theory/state-counts.md).  A TeX engine compiles the LaTeX when one is installed; without
one the table is checked structurally.
"""

from __future__ import annotations

import re
import shutil
import subprocess
from fractions import Fraction
from math import comb
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.catalog.service import Catalog
from zoo.cli import app
from zoo.publish.tables import PaperTable, latex, latex_escape, markdown, render

TRICKY = PaperTable(
    headings=("id", "buffer_slots", "share %", "a & b"),
    rows=(
        ("CY8-1", 2**100 + 1, Fraction(-3, 7), True),
        ("carts_on_loop", 12, "5/1", ["1/3", "-2/3"]),
        ("100% & #1 {x} ~y^2 $z\\", None, Fraction(4, 1), False),
    ),
    note="Complete up to area 16 (cf. note_1: 100% & more).",
)


def _check_latex_structure(text: str, columns: int) -> None:
    """Balanced braces and environments, each row with its column count, no bare specials."""
    # Braces balance once escaped ones (\{ \}) are removed.
    bare = re.sub(r"\\[{}]", "", text)
    depth = 0
    for char in bare:
        depth += {"{": 1, "}": -1}.get(char, 0)
        assert depth >= 0, text
    assert depth == 0, text
    stack: list[str] = []
    for kind, name in re.findall(r"\\(begin|end)\{(\w+)\}", text):
        if kind == "begin":
            stack.append(name)
        else:
            assert stack.pop() == name
    assert not stack
    spec = re.search(r"\\begin\{tabular\}\{([lr]+)\}", text)
    assert spec is not None and len(spec.group(1)) == columns
    body = text[spec.end() : text.index(r"\end{tabular}")]
    rows = [line for line in body.splitlines() if line.endswith(r"\\")]
    for row in rows:
        # Unescaped & separate columns; \& is text.
        assert len(re.findall(r"(?<!\\)&", row)) == columns - 1, row
    # No special character is left bare outside math: %, #, _ and ~ only as \%, \#, \_, ...
    for line in text.splitlines()[1:]:  # the first line is a % comment
        if line.startswith(r"\label{"):
            continue  # a label is a key, where _ is allowed
        outside_math = re.sub(r"\$[^$]*\$", "", line.replace(r"\$", ""))
        assert not re.search(r"(?<!\\)[%#_~^]", outside_math), line


def _compile(tmp_path: Path, body: str) -> None:
    """Compile with the first TeX engine installed; skip (the only skip) when there is none."""
    engine = shutil.which("pdflatex") or shutil.which("lualatex")
    if engine is None:
        pytest.skip("no TeX engine (pdflatex, lualatex) installed; checked structurally")
    doc = tmp_path / "doc.tex"
    doc.write_text("\\documentclass{article}\n\\begin{document}\n" + body + "\\end{document}\n")
    run = subprocess.run(
        [engine, "-interaction=nonstopmode", "-halt-on-error", doc.name],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert run.returncode == 0, run.stdout[-2000:]
    assert (tmp_path / "doc.pdf").exists()


def test_latex_escapes_the_ten_special_characters() -> None:
    assert latex_escape("a_b 100% x&y #1 $ {} ~ ^ \\") == (
        r"a\_b 100\% x\&y \#1 \$ \{\} \textasciitilde{} \textasciicircum{} \textbackslash{}"
    )


def test_latex_table_is_exact_escaped_and_balanced() -> None:
    text = latex(TRICKY, label="tab:ring_designs")
    _check_latex_structure(text, 4)
    assert str(2**100 + 1) in text  # all 31 digits, no rounding, no separators
    assert "$-3/7$" in text and "1/3, $-2/3$" in text
    assert r"CY8-1 & 1267650600228229401496703205377 & $-3/7$ & yes \\" in text
    assert r"carts\_on\_loop & 12 & 5 &" in text  # "5/1" is the whole number 5
    assert r"100\% \& \#1 \{x\}" in text
    assert r"\caption{Complete up to area 16 (cf. note\_1: 100\% \& more).}" in text
    assert r"\label{tab:ring_designs}" in text
    assert "booktabs" not in text and r"\usepackage" not in text
    assert r"\begin{tabular}{lrrl}" in text  # numbers right-aligned


def test_latex_table_compiles(tmp_path: Path) -> None:
    _compile(tmp_path, latex(TRICKY))


def test_markdown_table_follows_gfm() -> None:
    text = markdown(TRICKY)
    lines = text.splitlines()
    assert lines[0] == "| id | buffer_slots | share % | a & b |"
    assert lines[1] == "| --- | ---: | ---: | --- |"
    assert lines[2] == "| CY8-1 | 1267650600228229401496703205377 | -3/7 | yes |"
    assert lines[3] == "| carts_on_loop | 12 | 5 | 1/3, -2/3 |"
    # Every row has as many unescaped pipes as the header.
    pipes = [len(re.findall(r"(?<!\\)\|", line)) for line in lines[:5]]
    assert pipes == [5] * 5
    assert lines[-1] == TRICKY.note and lines[-2] == ""


def test_render_refuses_an_unknown_format() -> None:
    with pytest.raises(ValueError, match="markdown, latex"):
        render("html", ["a"], [[1]], "note")


@pytest.fixture(scope="module")
def catalog8(tmp_path_factory: pytest.TempPathFactory) -> str:
    db = tmp_path_factory.mktemp("tables") / "catalog.sqlite3"
    with Catalog.open(str(db), create=True) as catalog:
        build_catalog(catalog, 8)
    return str(db)


def _states_formula(label: str) -> int:
    alpha, beta, gamma, delta = map(int, re.findall(r"\d+", label))
    area = alpha * delta + beta * gamma
    return area * comb(alpha + beta, alpha) // (alpha + beta)  # docs/theory/state-counts.md


def test_find_latex_has_the_chosen_columns_and_the_note(catalog8: str, tmp_path: Path) -> None:
    result = CliRunner().invoke(
        app, ["find", "area <= 8", "--db", catalog8, "-f", "latex", "-c", "states,cycle_time"]
    )
    assert result.exit_code == 0, result.output
    text = result.stdout
    _check_latex_structure(text, 6)
    assert r"id & label & area & states & cycle\_time & members \\" in text
    rows = re.findall(r"^(CY\d+-\d+) & (C\([\d,]+\)) & (\d+) & (\d+) & ", text, re.M)
    assert rows
    for _, label, _, states in rows:
        assert int(states) == _states_formula(label)
    caption = re.search(r"\\caption\{(.*)\}", text)
    assert caption is not None and "complete up to area 8" in caption.group(1)
    _compile(tmp_path, text)


def test_find_markdown_puts_the_note_under_the_table(catalog8: str) -> None:
    result = CliRunner().invoke(
        app, ["find", "area <= 5", "--db", catalog8, "-f", "markdown", "--limit", "3"]
    )
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    assert lines[0].startswith("| id | label | area | loop |")
    assert len([line for line in lines if line.startswith("| CY")]) == 3
    assert "showing 3" in lines[-1] and "complete up to area 8" in lines[-1]
