"""TikZ pictures (zoo.pictures.tikz) and ``zoo draw --format tikz|pdf``.

The TikZ must compile with a stock TeX installation: it is compiled with pdflatex or lualatex when
one is installed (skipped otherwise, the only skip), and always checked structurally against the
rules of the TikZ & PGF manual (Tantau, version 3.1: ``tikzpicture`` environment §12.2.1, the
``arrows.meta`` library §16.5, colours through xcolor's ``\\definecolor{name}{HTML}{RRGGBB}``,
xcolor manual §2.5.2) and of TeX (balanced braces, finite dimensions below 16384pt; The TeXbook
ch. 10). PDF files start with ``%PDF-`` and end with ``%%EOF`` (ISO 32000-1 §7.5.2, §7.5.5).
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app
from zoo.core.params import ParameterSet
from zoo.pictures.tikz import LIBRARIES, tex_text, tikz_document, tikz_picture
from zoo.pictures.views import draw, draw_tikz, picture_scene

C4223 = ParameterSet(4, 2, 2, 3)
CASES = [
    ("parallelogram", C4223),
    ("net", C4223),
    ("net", ParameterSet(1, 2, 1, 2)),  # two rings: dashed arcs back to the inner ring
    ("processes", ParameterSet(3, 2, 6, 6)),
    ("states", ParameterSet(2, 2, 1, 3)),
]
#: Libraries that ship with TikZ itself (PGF manual part III/V); nothing else may be loaded.
STANDARD_LIBRARIES = {"arrows.meta", "calc", "positioning", "shapes.geometric", "decorations"}
#: Colours xcolor defines without \definecolor (xcolor manual §4, base colours).
BASE_COLOURS = {"white", "black"}


def check_tikz(text: str, standalone: bool) -> None:
    """The structural rules a TikZ file must follow to compile."""
    body = re.sub(r"(?<!\\)%.*", "", text)  # comments are not TeX input
    bare = re.sub(r"\\[{}]", "", body)
    depth = 0
    for char in bare:
        depth += {"{": 1, "}": -1}.get(char, 0)
        assert depth >= 0
    assert depth == 0, "unbalanced braces"
    stack: list[str] = []
    for kind, name in re.findall(r"\\(begin|end)\{([\w*]+)\}", body):
        if kind == "begin":
            stack.append(name)
        else:
            assert stack and stack.pop() == name, name
    assert not stack
    environments = re.findall(r"\\begin\{([\w*]+)\}", body)
    assert environments == (["document", "tikzpicture"] if standalone else ["tikzpicture"])
    if standalone:
        assert body.startswith("\\documentclass[border=4pt]{standalone}\n")
        assert re.findall(r"\\usepackage\{([^}]*)\}", body) == ["tikz"]
        libraries = re.findall(r"\\usetikzlibrary\{([^}]*)\}", body)
        assert libraries == [",".join(LIBRARIES)]
    else:
        assert "\\documentclass" not in body and "\\usepackage" not in body
    assert set(LIBRARIES) <= STANDARD_LIBRARIES
    defined = set(re.findall(r"\\definecolor\{(\w+)\}\{HTML\}\{[0-9A-F]{6}\}", body))
    used = set(re.findall(r"(?:draw|fill|text)=(\w+)", body))
    assert used - defined <= BASE_COLOURS, used - defined - BASE_COLOURS
    # Every number is finite and every coordinate well below TeX's 16384pt at the unit length.
    for number in re.findall(r"-?\d+(?:\.\d+)?(?:e[-+]?\d+)?|nan|inf", body):
        value = float(number)
        assert math.isfinite(value)
    unit = re.search(r"\\begin\{tikzpicture\}\[x=([\d.]+)in,y=([\d.]+)in", body)
    assert unit is not None
    for x, y in re.findall(r"\((-?[\d.]+),(-?[\d.]+)\)", body):
        assert abs(float(x)) * float(unit.group(1)) * 72.27 < 16384
        assert abs(float(y)) * float(unit.group(2)) * 72.27 < 16384
    # Text is ASCII: pdflatex reads no Unicode without extra packages.
    assert all(ord(c) < 127 for c in body)
    # Each statement of the picture ends with a semicolon.
    picture = body[body.index("\\begin{tikzpicture}") : body.index("\\end{tikzpicture}")]
    for line in picture.splitlines()[1:]:
        if line.startswith(("\\draw", "\\node", "\\path", "\\filldraw")):
            assert line.endswith(";"), line


def compile_tex(tmp_path: Path, document: str) -> Path:
    """Compile with the first TeX engine installed; skip (the only skip) when there is none."""
    engine = shutil.which("pdflatex") or shutil.which("lualatex")
    if engine is None:
        pytest.skip("no TeX engine (pdflatex, lualatex) installed; checked structurally")
    (tmp_path / "picture.tex").write_text(document)
    run = subprocess.run(
        [engine, "-interaction=nonstopmode", "-halt-on-error", "picture.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert run.returncode == 0, run.stdout[-3000:]
    return tmp_path / "picture.pdf"


@pytest.mark.parametrize(("view", "p"), CASES)
def test_tikz_document_and_fragment_are_well_formed(view: str, p: ParameterSet) -> None:
    check_tikz(draw_tikz(p, view, standalone=True), standalone=True)
    check_tikz(draw_tikz(p, view, standalone=False), standalone=False)


@pytest.mark.parametrize(("view", "p"), CASES)
def test_tikz_draws_what_the_svg_draws(view: str, p: ParameterSet) -> None:
    """One scene for every format: as many node markers and arrows in TikZ as in the scene."""
    scene = picture_scene(p, view)
    text = tikz_picture(scene)
    markers = sum(len(group.points) for group in scene.nodes)
    assert len(re.findall(r"\\node\[(?:rectangle|circle),inner sep=0pt,minimum size", text)) == (
        # ... plus one glyph per legend key with a node (a line key has one when it is filled)
        markers
        + sum(
            1 for key in scene.legend if key.glyph not in ("line", "dashed") or key.face != "none"
        )
    )
    assert len(re.findall(r"\\draw\[-\{Latex\[length=6pt", text)) == len(scene.arcs)
    if view != "states":
        # docs/theory/initial-marking.md: alpha + beta tokens, 2A places, A transitions.
        tokens = next(g for g in scene.nodes if g.gid == "tokens")
        assert len(tokens.points) == p.alpha + p.beta
        assert len(next(g for g in scene.nodes if g.gid == "places").points) == 2 * p.area


def test_tikz_text_is_escaped() -> None:
    assert tex_text("t_1_-1 \u2261 50% & #2") == r"t\_1\_-1 $\equiv$ 50\% \& \#2"
    assert tex_text("a\nb") == r"a\\b"
    with pytest.raises(ValueError, match="no LaTeX spelling"):
        tex_text("\u4e00")


@pytest.mark.parametrize(("view", "p"), CASES[:1] + CASES[-1:])
def test_tikz_compiles(tmp_path: Path, view: str, p: ParameterSet) -> None:
    pdf = compile_tex(tmp_path, tikz_document(picture_scene(p, view)))
    assert pdf.read_bytes().startswith(b"%PDF-")


def test_tikz_fragment_compiles_inside_a_paper(tmp_path: Path) -> None:
    fragment = draw_tikz(C4223, "parallelogram", standalone=False)
    (tmp_path / "figure.tex").write_text(fragment)
    paper = (
        "\\documentclass{article}\n\\usepackage{tikz}\n\\usetikzlibrary{arrows.meta}\n"
        "\\begin{document}\n\\begin{figure}\\centering\\resizebox{\\linewidth}{!}{"
        "\\input{figure.tex}}\\caption{C(4,2,2,3)}\\end{figure}\n\\end{document}\n"
    )
    compile_tex(tmp_path, paper)


@pytest.mark.parametrize("view", ["parallelogram", "net", "states"])
def test_pdf_is_a_whole_reproducible_file(view: str) -> None:
    p = ParameterSet(2, 2, 1, 3)
    data = draw(p, view, "pdf")
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    assert draw(p, view, "pdf") == data  # no creation date: the same net gives the same file


def test_cli_draw_tikz_pdf_and_fragment(tmp_path: Path) -> None:
    runner = CliRunner()
    tex = tmp_path / "c4223.tex"
    result = runner.invoke(app, ["draw", "4,2,2,3", "-o", str(tex)])
    assert result.exit_code == 0, result.output
    check_tikz(tex.read_text(), standalone=True)
    result = runner.invoke(app, ["draw", "4,2,2,3", "--format", "tikz", "--fragment"])
    assert result.exit_code == 0, result.output
    check_tikz(result.stdout, standalone=False)
    pdf = tmp_path / "c4223.pdf"
    result = runner.invoke(app, ["draw", "4,2,2,3", "--view", "net", "-o", str(pdf)])
    assert result.exit_code == 0, result.output
    assert pdf.read_bytes().startswith(b"%PDF-")
    result = runner.invoke(app, ["draw", "4,2,2,3", "--format", "pdf"])
    assert result.exit_code != 0 and "--output FILE.pdf" in result.output
    assert "Traceback" not in result.output
    result = runner.invoke(app, ["draw", "4,2,2,3", "--fragment"])
    assert result.exit_code != 0 and "--format tikz" in result.output
