"""The docs pages as the web catalog renders them: Markdown (CommonMark, via markdown-it-py as the
reference renderer) with raw HTML shown as text, and links between pages made web addresses."""

from __future__ import annotations

import re

import httpx

from zoo.web.docs import DOCS_DIR, load_docs, render_markdown


def test_raw_html_in_markdown_is_escaped() -> None:
    html = render_markdown('Hi <script>alert("x")</script>\n\n<img src=x onerror="alert(1)">\n')
    assert "<script>" not in html and "&lt;script&gt;" in html
    assert "<img" not in html
    assert "editors" not in render_markdown("<!-- a note for editors -->\n\nText.")


def test_relative_links_keep_their_folder() -> None:
    html = render_markdown("[a](folding.md) [b](../parameters.md) [c](README.md)", "theory")
    assert 'href="/docs/theory/folding"' in html and 'href="/docs/parameters"' in html
    assert 'href="/docs/theory"' in html


def test_links_between_pages_become_addresses() -> None:
    html = render_markdown(
        "See [the query language](query-language.md#fields) and ![x](images/a.png)."
    )
    assert 'href="/docs/query-language#fields"' in html
    assert 'src="/docs/images/a.png"' in html


def test_every_docs_page_is_served(live_url: str) -> None:
    docs = load_docs()
    assert len(docs.pages) == len(list(DOCS_DIR.glob("*.md"))) + len(list(DOCS_DIR.glob("*/*.md")))
    linked = {h for p in docs.pages.values() for h in re.findall(r'href="/docs/([^"#]*)', p.html)}
    assert linked and linked <= set(docs.pages) | {""}  # every link between pages lands
    for name in docs.pages:
        answer = httpx.get(f"{live_url}/docs/{name}")
        assert answer.status_code == 200, name
        assert '<article class="doc">' in answer.text
    assert httpx.get(f"{live_url}/docs/../pyproject").status_code == 404
    assert httpx.get(f"{live_url}/docs/images/nothing.png").status_code == 404
