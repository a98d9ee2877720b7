"""Seeds: named cycloids shipped in ``seeds_data/`` that the catalog build attaches to classes.

A seed file is TOML (read with the standard library's ``tomllib``) holding one ``[[seed]]``
table per entry; docs/seeds.md is the normative description::

    [[seed]]
    name = "pipeline-ring-3-frames-2-slots"
    description = "Ring buffer of a pipeline stage: 3 anonymous frames, 2 free slots"
    parameters = "C(2,3,1,1)"          # or [2, 3, 1, 1]

Every problem is reported as one ``FormatError`` line naming the file, the entry (its position
and name), the rule and the fix. Names are unique across all files of a directory.
"""

from __future__ import annotations

import re
import tomllib
from collections.abc import Iterable
from dataclasses import dataclass
from importlib import resources
from pathlib import Path

from zoo.core.params import ParameterSet, parse_params
from zoo.errors import FormatError, ParameterError

__all__ = [
    "NAME_PATTERN",
    "Seed",
    "default_seed_directory",
    "load_seed_directory",
    "load_seed_file",
    "parse_seed_text",
]

#: Seed names: lower-case letters, digits and single hyphens, starting with a letter.
NAME_PATTERN = re.compile(r"^[a-z][a-z0-9]*(?:-[a-z0-9]+)*$")
MAX_NAME_LENGTH = 80
MAX_DESCRIPTION_LENGTH = 300
_KEYS = {"name", "description", "parameters"}


@dataclass(frozen=True, order=True)
class Seed:
    """A named cycloid: a name, a one-line description and its parameter set."""

    name: str
    description: str
    params: ParameterSet
    source: str = ""  # the file it came from, for messages


def default_seed_directory() -> Path:
    """The seeds shipped with zoo: the installed package ``zoo.seeds_data``, else the checkout.

    pyproject.toml maps ``seeds_data/`` into the package as ``zoo.seeds_data``; in a source
    checkout without that mapping the directory beside the ``zoo`` package is used.
    """
    try:
        location = resources.files("zoo.seeds_data")
        path = Path(str(location))
        if path.is_dir():
            return path
    except (ModuleNotFoundError, TypeError):
        pass
    return Path(__file__).resolve().parent.parent / "seeds_data"


def _fail(source: str, where: str, message: str) -> FormatError:
    return FormatError(f"{source}: {where}: {message}")


def _read_parameters(value: object, source: str, where: str) -> ParameterSet:
    if isinstance(value, str):
        text = value
    elif isinstance(value, list) and all(
        isinstance(v, int) and not isinstance(v, bool) for v in value
    ):
        if len(value) != 4:
            raise _fail(
                source,
                where,
                f"parameters has {len(value)} numbers, a parameter set has four "
                "(alpha, beta, gamma, delta); write e.g. parameters = [2, 3, 1, 1]",
            )
        text = ",".join(str(v) for v in value)
    else:
        raise _fail(
            source,
            where,
            f'parameters must be text such as "C(2,3,1,1)" or a list of four whole numbers, '
            f"got {value!r}",
        )
    try:
        return parse_params(text)
    except ParameterError as exc:
        raise _fail(source, where, f"parameters: {exc}") from None


def _read_entry(entry: object, index: int, source: str) -> Seed:
    where = f"seed {index}"
    if not isinstance(entry, dict):
        raise _fail(source, where, "each [[seed]] must be a table of name, description, parameters")
    name = entry.get("name")
    if isinstance(name, str):
        where = f"seed {index} ({name!r})"
    unknown = sorted(set(entry) - _KEYS)
    if unknown:
        raise _fail(
            source,
            where,
            f"unknown key {unknown[0]!r}; a seed has only name, description and parameters",
        )
    for key in ("name", "description", "parameters"):
        if key not in entry:
            raise _fail(source, where, f"the key {key!r} is missing; every seed needs it")
    if not isinstance(name, str) or not NAME_PATTERN.match(name) or len(name) > MAX_NAME_LENGTH:
        raise _fail(
            source,
            where,
            f"name {name!r} must be lower-case letters, digits and single hyphens, starting "
            f"with a letter, at most {MAX_NAME_LENGTH} characters, e.g. "
            '"pipeline-ring-3-frames-2-slots"',
        )
    description = entry["description"]
    if not isinstance(description, str) or not description.strip():
        raise _fail(source, where, "description must be a non-empty line of text")
    if "\n" in description.strip() or len(description) > MAX_DESCRIPTION_LENGTH:
        raise _fail(
            source,
            where,
            f"description must be one line of at most {MAX_DESCRIPTION_LENGTH} characters",
        )
    params = _read_parameters(entry["parameters"], source, where)
    return Seed(name=name, description=description.strip(), params=params, source=source)


def parse_seed_text(text: str, source: str = "<text>") -> list[Seed]:
    """Read the seeds of one TOML document; FormatError names source and entry on any problem."""
    try:
        document = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise FormatError(f"{source}: not valid TOML ({exc}); see docs/seeds.md") from None
    unknown = sorted(set(document) - {"seed"})
    if unknown:
        raise FormatError(
            f"{source}: unknown top-level key {unknown[0]!r}; a seed file holds only [[seed]] "
            "tables (see docs/seeds.md)"
        )
    entries = document.get("seed", [])
    if not isinstance(entries, list):
        raise FormatError(f"{source}: 'seed' must be written as [[seed]] tables, one per entry")
    seeds = [_read_entry(entry, index, source) for index, entry in enumerate(entries, 1)]
    _check_unique(seeds)
    return seeds


def load_seed_file(path: Path) -> list[Seed]:
    """Read one seed file."""
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise FormatError(f"{path}: cannot read the seed file ({exc})") from None
    return parse_seed_text(text, str(path.name))


def load_seed_directory(directory: Path | None = None) -> list[Seed]:
    """Every seed of every ``*.toml`` file in a directory (default: the shipped seeds), by name."""
    directory = default_seed_directory() if directory is None else directory
    if not directory.is_dir():
        raise FormatError(f"{directory}: the seed directory does not exist")
    seeds: list[Seed] = []
    for path in sorted(directory.glob("*.toml")):
        seeds.extend(load_seed_file(path))
    _check_unique(seeds)
    return sorted(seeds, key=lambda s: s.name)


def _check_unique(seeds: Iterable[Seed]) -> None:
    seen: dict[str, Seed] = {}
    for seed in seeds:
        if seed.name in seen:
            first = seen[seed.name]
            raise FormatError(
                f"{seed.source}: seed {seed.name!r} is defined twice (also in {first.source}); "
                "seed names must be unique, rename one of them"
            )
        seen[seed.name] = seed
