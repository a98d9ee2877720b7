"""Citations of catalog entries: BibTeX and plain text (docs/citing.md, docs/releases.md).

A citation names the entry by its identifier (``CY16-3`` for a class, ``FR16-2`` for a frame),
its label (the smallest member, which anyone can recompute), the version of the catalog it was
read from and its fingerprint (the SHA-256 of the portable canonical form, for checking).

The *catalog version* has three parts, all read from the catalog itself:

* the zoo version that built it (``catalog_info.built_by``, else ``zoo_version``);
* the canonical-form encoding of its fingerprints (``catalog_info.encoding``);
* the area to which it is complete (every area 1..N stored).

Written ``zoo 0.1.0/v1/A<=12`` in manifests and JSON, and in words (``zoo 0.1.0, canonical
encoding v1, complete to area 12``) in citations: BibTeX under LaTeX's default OT1 font
encoding prints ``<`` as an inverted exclamation mark, so no BibTeX field carries ``<=``.
An identifier's meaning never changes (its area is stored
whole), so the version tells a reader which catalog they can look the entry up in, not a
different meaning.

Every citation carries the project's landing page (``zoo.version.HOMEPAGE``, also in
pyproject.toml and CITATION.cff) as BibTeX's ``url`` field.

The BibTeX entry is ``@misc`` (the BibTeX standard styles' type for a work that fits no other)
with the key ``zoo:CY16-3``, derived from the identifier alone so that it is stable across
catalog versions.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any

from zoo.errors import CatalogError, NotInCatalog
from zoo.version import HOMEPAGE, __version__

#: Title of the work a citation points into.
CATALOG_TITLE = "zoo: a research catalog of Petri's cycloids"


@dataclass(frozen=True)
class CatalogVersion:
    """The version of a catalog's content: building zoo, fingerprint encoding, completeness."""

    zoo_version: str
    encoding: str
    complete_to: int

    def __str__(self) -> str:
        return f"zoo {self.zoo_version}/{self.encoding}/A<={self.complete_to}"

    def describe(self) -> str:
        """The version in words, for plain-text citations."""
        return (
            f"zoo {self.zoo_version}, canonical encoding {self.encoding}, "
            f"complete to area {self.complete_to}"
        )

    def as_dict(self) -> dict[str, Any]:
        return {
            "zoo_version": self.zoo_version,
            "encoding": self.encoding,
            "complete_to": self.complete_to,
            "text": str(self),
        }


def catalog_version(catalog: Any) -> CatalogVersion:
    """Read the catalog version from an open zoo.catalog.service.Catalog (``info()``,
    ``complete_to()``).

    A catalog without a recorded encoding has never been built: nothing in it can be cited.
    """
    info: dict[str, str] = catalog.info()
    encoding = info.get("encoding")
    if not encoding:
        raise CatalogError(
            f"catalog {catalog.location} records no fingerprint encoding, so it was never built; "
            f"build it first with: zoo build --db {catalog.location}"
        )
    version = info.get("built_by") or info.get("zoo_version") or __version__
    return CatalogVersion(version, encoding, int(catalog.complete_to()))


@dataclass(frozen=True)
class Citation:
    """Everything a citation of one entry says."""

    identifier: str
    kind: str  # "class" | "frame"
    label: str
    fingerprint: str
    version: CatalogVersion
    year: int | None = None  # year the catalog was created, when it records it

    @property
    def key(self) -> str:
        return bibtex_key(self.identifier)

    def text(self) -> str:
        """One plain-text line: work, entry, label, catalog version, fingerprint."""
        what = "class" if self.kind == "class" else "frame"
        year = f" ({self.year})" if self.year else ""
        return (
            f"{CATALOG_TITLE}{year}, {what} {self.identifier}, label {self.label}; "
            f"catalog version {self.version.describe()}; fingerprint {self.fingerprint}; "
            f"{HOMEPAGE}."
        )

    def bibtex(self) -> str:
        """A BibTeX ``@misc`` entry; every value braced, braces in values balanced."""
        what = "Cycloid class" if self.kind == "class" else "Cycloid frame"
        fields: list[tuple[str, str]] = [
            ("title", f"{{{what} {self.identifier}: {self.label}}}"),
            ("author", "{zoo contributors}"),
            ("howpublished", f"{CATALOG_TITLE}, catalog version {self.version.describe()}"),
        ]
        if self.year:
            fields.append(("year", str(self.year)))
        fields += [
            ("version", self.version.describe()),
            (
                "note",
                f"Identifier {self.identifier}, label {self.label}, catalog version "
                f"{self.version.describe()}, fingerprint {self.fingerprint}",
            ),
        ]
        body = ",\n".join(f"  {name} = {{{_bibtex_value(value)}}}" for name, value in fields)
        # A URL is written as is: BibTeX styles hand it to \url, which reads % and _ literally.
        body += f",\n  url = {{{HOMEPAGE}}}"
        return f"@misc{{{self.key},\n{body}\n}}\n"

    def as_dict(self) -> dict[str, Any]:
        return {
            "id": self.identifier,
            "kind": self.kind,
            "label": self.label,
            "fingerprint": self.fingerprint,
            "catalog_version": self.version.as_dict(),
            "year": self.year,
            "url": HOMEPAGE,
            "bibtex_key": self.key,
            "bibtex": self.bibtex(),
            "text": self.text(),
        }


def bibtex_key(identifier: str) -> str:
    """The stable BibTeX key of an identifier: ``zoo:`` and the identifier.

    >>> bibtex_key("CY16-3")
    'zoo:CY16-3'
    """
    if not re.fullmatch(r"[A-Za-z]{2}\d+-\d+", identifier):
        raise NotInCatalog(
            f"{identifier!r} is not a catalog identifier such as CY16-3; cite by identifier"
        )
    return f"zoo:{identifier.upper()}"


def _bibtex_value(text: str) -> str:
    """Escape characters that BibTeX or LaTeX would read specially inside a braced value."""
    out = []
    depth = 0
    for ch in text:
        if ch in "%&#$_":
            out.append("\\" + ch)
        elif ch == "{":
            depth += 1
            out.append(ch)
        elif ch == "}":
            if depth == 0:
                out.append("\\}")
            else:
                depth -= 1
                out.append(ch)
        elif ch == "\\":
            out.append("\\textbackslash{}")
        else:
            out.append(ch)
    out.extend("}" * depth)  # never leave a brace open: it would swallow the rest of the file
    return "".join(out)


def cite(catalog: Any, ref: str) -> Citation:
    """The citation of a class (identifier, label or member) or frame (FR identifier)."""
    from zoo.catalog.identifiers import read_identifier

    version = catalog_version(catalog)
    identifier = read_identifier(ref)
    if identifier is not None and identifier.kind == "frame":
        frame = catalog.frame(str(identifier))
        return Citation(
            frame.id, "frame", frame.label, frame.fingerprint, version, _catalog_year(catalog)
        )
    entry = catalog.get(ref)
    return Citation(
        entry.id, "class", entry.label, entry.fingerprint, version, _catalog_year(catalog)
    )


def _catalog_year(catalog: Any) -> int | None:
    """The year the catalog was created (``catalog_info.created_at``), None if not recorded."""
    created = catalog.info().get("created_at", "")
    match = re.match(r"(\d{4})-", created)
    return int(match.group(1)) if match else None
