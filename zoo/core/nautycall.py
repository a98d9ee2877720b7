"""One nauty run per graph: the canonical labelling and the automorphism group order together.

nauty computes the order of the automorphism group while it searches for the canonical
labelling (McKay and Piperno, "Practical graph isomorphism II", J. Symbolic Computation 60
(2014); nauty user guide, ``statsblk``), but pynauty 2.8 returns either the labelling
(``canon_label``) or the group (``autgrp``), each from its own run. ``canonical_run`` makes the
one run itself: it calls ``nauty()`` through ctypes in pynauty's own compiled module, which
exports nauty's C symbols, with exactly the options pynauty's ``canon_label`` sets (nautywrap.c
in pynauty 2.8.8: nauty's default options, undirected, ``getcanon``, the colouring as ``lab`` and
``ptn``, a workspace of 66 setwords per row), so the labelling is the one ``canon_label`` gives
and the group order the one ``autgrp`` gives (tests/core/test_nautycall.py compares both).

The structures below copy ``optionblk`` and ``statsblk`` of nauty 2.8.8's ``nauty.h``. When the
module or a symbol is missing, the word size is not one we know, or a check run on a small graph
disagrees with pynauty's own calls, the first call logs the reason once and every run takes
pynauty's two calls instead: slower, never different.

Generators of the group are not collected in the single run (nauty hands them to a callback,
and a Python callback would let another thread into nauty's static state); the exact group
order needs them only when the order passes 10^10 (``exact`` False), and then
``automorphism_generators`` asks pynauty's ``autgrp`` for them.
"""

from __future__ import annotations

import ctypes
import logging
import sys
from collections.abc import Collection, Sequence
from collections.abc import Set as AbstractSet
from dataclasses import dataclass
from typing import Any

import numpy as np
import numpy.typing as npt

#: Vertex numbers: a list of ints or an integer array.
Vertices = Sequence[int] | npt.NDArray[np.int64]
#: An ordered colour partition: cells of vertex numbers (sets are read in iteration order).
Cells = Sequence[Collection[int] | npt.NDArray[np.int64]]
#: (n, tails, heads, cells): vertices 0..n-1, the edges (tails[i], heads[i]) once each.
NautyInput = tuple[int, Vertices, Vertices, Cells]

__all__ = [
    "Cells",
    "NautyInput",
    "NautyRun",
    "Vertices",
    "automorphism_generators",
    "canonical_run",
    "single_run_status",
]

_log = logging.getLogger(__name__)

#: nauty versions (pynauty's ``_nauty_version``) whose nauty.h has the structures below; add
#: one only after comparing its ``optionblk`` and ``statsblk`` with them.
_KNOWN_NAUTY = ("nauty2_8_8",)
#: Workspace per row of the graph, in setwords, as pynauty allocates it (nautywrap.h).
_WORKSPACE_FACTOR = 66


class _Options(ctypes.Structure):
    """``optionblk`` of nauty 2.8.8 (nauty.h), without the Magma-only fields."""

    _fields_ = [
        ("getcanon", ctypes.c_int),
        ("digraph", ctypes.c_int),
        ("writeautoms", ctypes.c_int),
        ("writemarkers", ctypes.c_int),
        ("defaultptn", ctypes.c_int),
        ("cartesian", ctypes.c_int),
        ("linelength", ctypes.c_int),
        ("outfile", ctypes.c_void_p),
        ("userrefproc", ctypes.c_void_p),
        ("userautomproc", ctypes.c_void_p),
        ("userlevelproc", ctypes.c_void_p),
        ("usernodeproc", ctypes.c_void_p),
        ("usercanonproc", ctypes.c_void_p),
        ("invarproc", ctypes.c_void_p),
        ("tc_level", ctypes.c_int),
        ("mininvarlevel", ctypes.c_int),
        ("maxinvarlevel", ctypes.c_int),
        ("invararg", ctypes.c_int),
        ("dispatch", ctypes.c_void_p),
        ("schreier", ctypes.c_int),
        ("extra_options", ctypes.c_void_p),
    ]


class _Stats(ctypes.Structure):
    """``statsblk`` of nauty 2.8.8 (nauty.h)."""

    _fields_ = [
        ("grpsize1", ctypes.c_double),
        ("grpsize2", ctypes.c_int),
        ("numorbits", ctypes.c_int),
        ("numgenerators", ctypes.c_int),
        ("errstatus", ctypes.c_int),
        ("numnodes", ctypes.c_ulong),
        ("numbadleaves", ctypes.c_ulong),
        ("maxlevel", ctypes.c_int),
        ("tctotal", ctypes.c_ulong),
        ("canupdates", ctypes.c_ulong),
        ("invapplics", ctypes.c_ulong),
        ("invsuccesses", ctypes.c_ulong),
        ("invarsuclevel", ctypes.c_int),
    ]


@dataclass(frozen=True)
class NautyRun:
    """What one canonical labelling run of nauty gives.

    ``labelling[i]`` is the vertex at canonical position i (pynauty's ``canon_label``); the
    group order is ``grpsize1 * 10**grpsize2`` (nauty's ``statsblk``), an exact integer when
    ``exact``. ``runs`` counts nauty runs spent (1, or 2 on the fallback);
    ``generators`` is filled only by the fallback, which has them from ``autgrp``.
    """

    labelling: list[int]
    grpsize1: float
    grpsize2: int
    runs: int
    generators: list[list[int]] | None = None

    @property
    def exact(self) -> bool:
        """nauty moves a factor 10^10 into grpsize2 whenever grpsize1 reaches 10^10 and
        multiplies grpsize1 by whole numbers only (nauty user guide, "statsblk"), so with
        grpsize2 = 0 the double is the exact order."""
        return self.grpsize2 == 0 and float(self.grpsize1).is_integer()


class _Engine:
    """nauty() in pynauty's module, with its option block; built once by ``_engine``."""

    def __init__(self, library: Any, wordsize: int) -> None:
        self.nauty = library.nauty
        self.nauty.restype = None
        self.nauty.argtypes = [ctypes.c_void_p] * 8 + [ctypes.c_int] * 3 + [ctypes.c_void_p]
        self.dtype = np.uint64 if wordsize == 64 else np.uint32
        # Bit i of a set is the i-th most significant bit of its word (nauty.h, "set"); in a
        # little-endian word that is byte (wordsize - 8 - (i - i % 8)) / 8 counted from the
        # first byte, so numpy's packbits (most significant bit first) writes bit i of a row
        # at position i ^ flip.
        self.flip = wordsize - 8 if sys.byteorder == "little" else 0
        self.wordsize = wordsize
        self.options = _Options(
            getcanon=1,
            digraph=0,
            writeautoms=0,
            writemarkers=0,
            defaultptn=0,
            cartesian=1,
            linelength=0,
            tc_level=100,
            mininvarlevel=0,
            maxinvarlevel=1,
            invararg=0,
            dispatch=ctypes.addressof(ctypes.c_char.in_dll(library, "dispatch_graph")),
            schreier=0,
        )  # DEFAULTOPTIONS_GRAPH of nauty.h with pynauty's changes (nautywrap.c)
        self.stats = _Stats()

    def run(
        self,
        n: int,
        tails: npt.NDArray[np.int64],
        heads: npt.NDArray[np.int64],
        partition: tuple[npt.NDArray[np.intc], npt.NDArray[np.intc]],
    ) -> NautyRun:
        m = (n + self.wordsize - 1) // self.wordsize
        stride = self.wordsize * m
        bits = np.zeros(n * stride, dtype=np.bool_)
        bits[tails * stride + (heads ^ self.flip)] = True
        bits[heads * stride + (tails ^ self.flip)] = True
        matrix = np.packbits(bits)
        lab_array, ptn_array = partition
        orbits = np.empty(n, dtype=np.intc)
        canonical = np.empty(n * m, dtype=self.dtype)  # nauty writes the canonical graph here
        workspace = np.empty(_WORKSPACE_FACTOR * m, dtype=self.dtype)
        stats = self.stats
        self.nauty(
            matrix.ctypes.data,
            lab_array.ctypes.data,
            ptn_array.ctypes.data,
            None,
            orbits.ctypes.data,
            ctypes.addressof(self.options),
            ctypes.addressof(stats),
            workspace.ctypes.data,
            _WORKSPACE_FACTOR * m,
            m,
            n,
            canonical.ctypes.data,
        )
        if stats.errstatus:
            raise ArithmeticError(f"nauty reported error status {stats.errstatus}")
        return NautyRun(lab_array.tolist(), stats.grpsize1, stats.grpsize2, 1)


_ENGINE: _Engine | None = None
_STATUS: str | None = None  # None: not tried yet


def _pynauty_graph(n: int, tails: Vertices, heads: Vertices, cells: Cells) -> Any:
    import pynauty

    adjacency: dict[int, list[int]] = {}
    for u, v in zip(tails, heads, strict=True):
        adjacency.setdefault(int(u), []).append(int(v))
    return pynauty.Graph(
        n,
        directed=False,
        adjacency_dict=adjacency,
        vertex_coloring=[{int(v) for v in c} for c in cells],
    )


def _partition(n: int, cells: Cells) -> tuple[npt.NDArray[np.intc], npt.NDArray[np.intc]]:
    """nauty's (lab, ptn) for an ordered partition: the cells one after another, each in its
    own iteration order, ptn 0 at the end of each cell (nauty user guide, "lab and ptn").

    A single cell is the unit partition 0..n-1, as pynauty passes it (``defaultptn``).
    """
    sizes = [len(cell) for cell in cells if len(cell)]
    parts = [
        np.fromiter(cell, np.intc, len(cell))
        if isinstance(cell, AbstractSet)
        else np.asarray(cell, dtype=np.intc)
        for cell in cells
    ]
    lab = np.concatenate(parts) if parts else np.zeros(0, dtype=np.intc)
    if len(lab) != n or (n and np.bincount(lab, minlength=n).max() != 1):
        raise ValueError(f"the cells must partition the {n} vertices, each vertex once")
    if len(sizes) == 1:
        lab = np.arange(n, dtype=np.intc)
    ptn = np.ones(n, dtype=np.intc)
    ptn[np.cumsum(sizes) - 1] = 0
    return lab, ptn


def _check(engine: _Engine) -> str | None:
    """Why the single run cannot be trusted, or None: compares it with pynauty's two calls."""
    import pynauty

    petersen = [(i, (i + 1) % 5) for i in range(5)] + [(i, i + 5) for i in range(5)]
    petersen += [(5 + i, 5 + (i + 2) % 5) for i in range(5)]
    ring = [(i, (i + 1) % 70) for i in range(70)]  # two setwords per row on 64-bit words
    samples: list[tuple[int, list[tuple[int, int]], list[set[int]]]] = [
        (10, petersen, [set(range(10))]),  # a group of order 120
        (70, ring, [set(range(0, 70, 2)), set(range(1, 70, 2))]),
    ]
    for n, edges, cells in samples:
        tails, heads = [u for u, _ in edges], [v for _, v in edges]
        graph = _pynauty_graph(n, tails, heads, cells)
        expected = (pynauty.canon_label(graph), *pynauty.autgrp(graph)[1:3])
        # The very sets pynauty reads, so that both see the cells in the same order.
        coloured = graph.vertex_coloring or [set(range(n))]
        run = engine.run(n, np.array(tails), np.array(heads), _partition(n, coloured))
        if (run.labelling, run.grpsize1, run.grpsize2) != expected:
            return f"a check run on {n} vertices disagrees with pynauty's canon_label and autgrp"
    return None


def _engine() -> _Engine | None:
    global _ENGINE, _STATUS
    if _STATUS is not None:
        return _ENGINE
    engine = None
    try:
        import pynauty
        from pynauty import nautywrap

        # A struct that does not match would crash nauty before any check could run.
        shipped = getattr(pynauty, "_nauty_version", "an unknown nauty")
        if shipped not in _KNOWN_NAUTY:
            raise OSError(f"pynauty ships {shipped}; the structures here are nauty 2.8.8's")
        # The word size is the length of a 1-vertex certificate: one setword (nautywrap.c).
        wordsize = 8 * len(pynauty.certificate(pynauty.Graph(1)))
        if wordsize not in (32, 64):
            raise OSError(f"pynauty's nauty uses {wordsize}-bit set words")
        # PyDLL keeps the GIL during the call, as pynauty does: nauty's state is static.
        engine = _Engine(ctypes.PyDLL(nautywrap.__file__), wordsize)
        problem = _check(engine)
        if problem is not None:
            raise OSError(problem)
    except (OSError, AttributeError, ValueError, ImportError, ArithmeticError) as error:
        engine = None
        _STATUS = (
            f"two nauty runs per form, pynauty's canon_label and autgrp (one run is not "
            f"available: {error})"
        )
        _log.info(_STATUS)
    else:
        _STATUS = "one nauty run per form (nauty() in pynauty's nautywrap module, via ctypes)"
    _ENGINE = engine
    return engine


def single_run_status() -> str:
    """Which path the runs take, and why: one line for benchmarks and logs."""
    _engine()
    assert _STATUS is not None
    return _STATUS


def canonical_run(n: int, tails: Vertices, heads: Vertices, cells: Cells) -> NautyRun:
    """Canonical labelling and group order of an undirected coloured graph, in one nauty run.

    The graph has vertices 0..n-1 and the edges (tails[i], heads[i]), each given once;
    ``cells`` is the ordered colour partition (pynauty's ``vertex_coloring``). Passing each cell
    as a set gives exactly the labelling of pynauty's ``canon_label``, which reads the cells
    in the order of their iteration. Falls back to pynauty's two calls (``single_run_status``).
    """
    if n == 0:
        return NautyRun([], 1.0, 0, 0)
    engine = _engine()
    if engine is None:
        import pynauty

        graph = _pynauty_graph(n, tails, heads, cells)
        labelling = list(pynauty.canon_label(graph))
        generators, grpsize1, grpsize2, _orbits, _count = pynauty.autgrp(graph)
        return NautyRun(labelling, grpsize1, grpsize2, 2, generators)
    return engine.run(
        n,
        np.asarray(tails, dtype=np.int64),
        np.asarray(heads, dtype=np.int64),
        _partition(n, cells),
    )


def automorphism_generators(
    n: int, tails: Vertices, heads: Vertices, cells: Cells
) -> list[list[int]]:
    """Generators of the automorphism group (pynauty's ``autgrp``): a second run, needed only
    when a single run's group order is not exact."""
    import pynauty

    generators: list[list[int]] = pynauty.autgrp(_pynauty_graph(n, tails, heads, cells))[0]
    return generators
