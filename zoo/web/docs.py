"""The Markdown pages of docs/, rendered safely for ``/docs/NAME``.

Read once at start into memory (a request names a page, never a path). Raw HTML in the Markdown is
shown as text, not passed through (markdown-it-py with ``html`` off), and links between pages are
rewritten to their web addresses.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

from markdown_it import MarkdownIt

#: docs/ beside the package in a source checkout (an editable install); an installed wheel has none.
DOCS_DIR = Path(__file__).resolve().parents[2] / "docs"
_NAME = re.compile(r"[a-z0-9][a-z0-9-]*")
_LOCAL_LINK = re.compile(
    r'href="(?:\./)?((?:\.\./)?(?:[a-z0-9-]+/)?(?:[a-z0-9-]+|README))\.md(#[^"]*)?"'
)
_COMMENT = re.compile(r"<!--.*?-->", re.DOTALL)
_IMAGE = re.compile(r'src="(?:\.\./docs/|\./)?images/([A-Za-z0-9_.-]+\.png)"')


@dataclass(frozen=True)
class DocPage:
    name: str  # address under /docs/, e.g. "query-language" or "invariants/loop"
    title: str
    html: str


@dataclass(frozen=True)
class Docs:
    pages: dict[str, DocPage]
    images: dict[str, bytes]


def render_markdown(text: str, folder: str = "") -> str:
    """HTML of Markdown text, raw HTML escaped, links to other .md pages made web addresses
    (``folder`` is the page's own folder under docs/, for its relative links)."""
    # HTML comments are notes for the editors of a page, not for its readers.
    text = _COMMENT.sub("", text)
    html = MarkdownIt("commonmark", {"html": False}).enable("table").render(text)

    def address(match: re.Match[str]) -> str:
        target = match.group(1)
        if target.startswith("../"):
            target = target[3:]
        elif folder:
            target = f"{folder}/{target}"
        return f'href="/docs/{page_name(target)}{match.group(2) or ""}"'

    html = _LOCAL_LINK.sub(address, html)
    return _IMAGE.sub(lambda m: f'src="/docs/images/{m.group(1)}"', html)


def page_name(relative: str) -> str:
    """The address of a docs file (without .md): a folder's README is the folder's page."""
    if relative.endswith("README"):
        return relative.removesuffix("README").rstrip("/") or "readme"
    return relative


def _title(text: str, fallback: str) -> str:
    for line in text.splitlines():
        if line.startswith("# "):
            return line[2:].strip()
    return fallback


def load_docs(folder: Path = DOCS_DIR) -> Docs:
    """Every docs page (one folder level deep) and picture, read now; empty without docs/."""
    pages: dict[str, DocPage] = {}
    images: dict[str, bytes] = {}
    if not folder.is_dir():
        return Docs(pages, images)
    for path in sorted([*folder.glob("*.md"), *folder.glob("*/*.md")]):
        relative = page_name(path.relative_to(folder).with_suffix("").as_posix())
        if not all(_NAME.fullmatch(part) for part in relative.split("/")):
            continue
        text = path.read_text(encoding="utf-8")
        home = path.parent.relative_to(folder).as_posix().strip(".")
        pages[relative] = DocPage(relative, _title(text, relative), render_markdown(text, home))
    for image in sorted(folder.glob("images/*.png")):
        images[image.name] = image.read_bytes()
    return Docs(pages, images)


__all__ = ["DOCS_DIR", "DocPage", "Docs", "load_docs", "render_markdown"]
