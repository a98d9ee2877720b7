"""What ``zoo show PARAMS``, ``zoo compare P1 P2`` and ``zoo explore`` report, as plain dicts.

The CLI only formats these dicts (a rich table or one JSON object); other tools read the JSON,
so the key names are a published interface (docs/parameters.md lists them).

Number conventions of every report:

* integers are JSON integers and exact, however large (reachable-state counts pass 10^58 by
  area 200); Python's ``json`` writes them digit for digit;
* fractions (slowness, cycle time) are strings ``"num/den"`` in lowest terms with a positive
  denominator that is always written, e.g. ``"1/3"``, ``"-9/11"``, ``"0/1"``, ``"8/1"``, with a
  float companion ``<key>_float`` for plotting;
* what needs the explicit net (automorphism group orders, nauty fingerprints, the names of
  enabled transitions) is ``null`` above ``zoo.core.net.NET_LIMIT`` transitions; ``notes`` says so.

The module is core: it imports neither the storage layer nor the command line.
"""

from __future__ import annotations

import time
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from zoo.core import algebra, invariants, registry
from zoo.core.params import ParameterSet
from zoo.core.reachability import DEFAULT_STATE_LIMIT
from zoo.errors import LimitExceeded

Report = dict[str, Any]


def fraction_text(value: Fraction) -> str:
    """A fraction as ``"num/den"``, denominator always written (``"0/1"``, ``"8/1"``)."""
    return f"{value.numerator}/{value.denominator}"


def transition_name(point: tuple[int, int]) -> str:
    """The contract name ``t_{xi}_{eta}`` of a transition (docs/architecture.md)."""
    return f"t_{point[0]}_{point[1]}"


def net_limit() -> int:
    """The largest area for which the explicit net is built (``zoo.core.net.NET_LIMIT``)."""
    from zoo.core.net import NET_LIMIT

    return NET_LIMIT


@dataclass(frozen=True)
class ExplicitForms:
    """The nauty canonical forms of the marked system and of the unmarked net of one C(p)."""

    automorphisms: int
    fingerprint: str
    net_automorphisms: int
    net_fingerprint: str


def explicit_forms(p: ParameterSet) -> ExplicitForms | None:
    """Canonical forms of C(p) by nauty, or None when the area is above the explicit-net limit."""
    forms, _ = explicit_forms_or_reason(p)
    return forms


def explicit_forms_or_reason(p: ParameterSet) -> tuple[ExplicitForms | None, str | None]:
    """The canonical forms of C(p), or None and a note saying why they were not computed.

    Not computed above ``zoo.core.net.NET_LIMIT`` transitions, and whenever building the net or the
    canonical form refuses the size (``LimitExceeded``) or runs out of memory (nauty allocates
    a dense adjacency matrix); the algebraic invariants never depend on them.
    """
    if p.area > net_limit():
        return None, above_limit_note(p)
    from zoo.core.canonical import net_form, system_form

    try:
        system = system_form(p)
        net = net_form(p)
    except LimitExceeded as exc:
        return None, _not_computed_note(p, str(exc))
    except MemoryError:
        return None, _not_computed_note(p, "nauty ran out of memory on a net this large")
    forms = ExplicitForms(
        system.automorphisms, system.fingerprint, net.automorphisms, net.fingerprint
    )
    return forms, None


def above_limit_note(p: ParameterSet) -> str:
    """The note printed when the explicit net of C(p) is not built."""
    return (
        f"{p} has area {p.area:,}, above the explicit-net limit {net_limit():,}: "
        "automorphisms, fingerprints and transition names are not computed (null); "
        "every algebraic invariant is exact"
    )


def _not_computed_note(p: ParameterSet, reason: str) -> str:
    return (
        f"{p}: automorphisms and fingerprints are not computed (null) because {reason}; "
        "every algebraic invariant is exact"
    )


def invariant_report(p: ParameterSet, *, explicit: bool = True) -> Report:
    """Every invariant of C(p), keyed as ``zoo show --format json`` prints them.

    ``explicit=False`` skips the explicit net (nauty), e.g. for a quick algebraic survey.
    The ``id`` key is left None; the caller fills it from the catalog if one is at hand.

    >>> report = invariant_report(ParameterSet(4, 2, 2, 3), explicit=False)
    >>> report["loop"], report["states"], report["slowness"]
    (5, 40, '1/3')
    """
    key = algebra.lattice_key(p)
    forward = invariants.forward_cycles(p)
    backward = invariants.backward_cycles(p)
    loop_xi, loop_eta = invariants.shortest_cycle_vector(p)
    slowness = invariants.slowness(p)
    cycle_time = invariants.cycle_time(p)
    forms, reason = explicit_forms_or_reason(p) if explicit else (None, None)
    notes = [reason] if reason else []
    named = explicit and p.area <= net_limit()
    report: Report = {
        "id": None,
        "params": {"alpha": p.alpha, "beta": p.beta, "gamma": p.gamma, "delta": p.delta},
        "label": str(p),
        "area": p.area,
        "places": 2 * p.area,
        "tokens": p.alpha + p.beta,
        "tokens_forward": p.beta,
        "tokens_backward": p.alpha,
        "loop": invariants.minimal_cycle_length(p),
        "loop_vector": [loop_xi, loop_eta],
        "loop_tokens": algebra.level(p, (loop_xi, loop_eta)) // p.area,
        "loop_one_token": invariants.one_token_loop(p),
        "loop_one_token_applies": invariants.one_token_formula_applies(p),
        "forward_cycles": forward.as_dict(),
        "backward_cycles": backward.as_dict(),
        "processes": invariants.process_count(p),
        "regular": invariants.is_regular(p),
        "states": invariants.reachable_state_count(p),
        "state_arcs": invariants.state_arc_count(p),
        "enabled": invariants.enabled_count(p),
        "semi_enabled": invariants.semi_enabled_count(p),
        "enabled_transitions": (
            [transition_name(t) for t in invariants.enabled_transitions(p)] if named else None
        ),
        "semi_enabled_transitions": (
            [transition_name(t) for t in invariants.semi_enabled_transitions(p)] if named else None
        ),
        "slowness": fraction_text(slowness),
        "slowness_float": float(slowness),
        "cycle_time": fraction_text(cycle_time),
        "cycle_time_float": float(cycle_time),
        "group": list(algebra.transition_group(p)),
        "cyclic": algebra.transition_group(p)[0] == 1,
        "lattice_key": [key.area, key.g, key.r],
        "swap": str(p.swap()),
        "normal_form_beta_delta": str(algebra.normal_form_beta_delta(p)),
        "normal_form_alpha_gamma": str(algebra.normal_form_alpha_gamma(p)),
        "iteration": algebra.iteration_depth(p),
        "class_group": list(algebra.class_transition_group(p)),
        "class_iteration": algebra.class_iteration_depth(p),
        "automorphisms": forms.automorphisms if forms else None,
        "net_automorphisms": forms.net_automorphisms if forms else None,
        "fingerprint": forms.fingerprint if forms else None,
        "net_fingerprint": forms.net_fingerprint if forms else None,
        "notes": notes,
    }
    # Every other formula of the registry, so that a new invariant reaches zoo show by its
    # registry entry alone (the keys above keep their published order; notes stay last).
    for inv in registry.INVARIANTS:
        top = inv.key.partition(".")[0]
        if inv.compute is None or inv.structural or top in report:
            continue
        if inv.level in (registry.Level.CLASS, registry.Level.READING, registry.Level.FRAME):
            report[inv.key] = registry.json_value(inv, inv.compute(p), p.area)
    report["notes"] = report.pop("notes")
    return report


LEVELS = ("same_reading", "same_class", "same_frame")


def compare_report(first: ParameterSet, second: ParameterSet) -> Report:
    """Whether two parameter sets are the same reading, class and frame, and on what evidence.

    * reading: equal lattice key and equal (alpha, beta) (docs/theory/isomorphism.md); decided by
      algebra,
      which is the definition;
    * class (isomorphic marked nets, places untyped) and frame (isomorphic unmarked nets): the
      algebraic keys of docs/theory/isomorphism.md *and* nauty fingerprints (below the explicit-net
      limit).
      When both are available and agree the evidence is ``"both"``; the answer then does not
      depend on either method alone. A disagreement is a bug: the answer follows nauty (graph
      isomorphism is the definition), the evidence is ``"nauty"``, and ``disagreements`` names
      the level so the caller can raise the alarm.
    """
    same_reading = algebra.reading_key(first) == algebra.reading_key(second)
    by_algebra = {
        "same_class": algebra.class_key(first) == algebra.class_key(second),
        "same_frame": algebra.frame_key(first) == algebra.frame_key(second),
    }
    first_forms, first_reason = explicit_forms_or_reason(first)
    second_forms, second_reason = (
        (first_forms, None) if second == first else explicit_forms_or_reason(second)
    )
    forms = (first_forms, second_forms)
    notes = [reason for reason in (first_reason, second_reason) if reason]
    by_nauty: dict[str, bool | None] = {"same_class": None, "same_frame": None}
    if first_forms is not None and second_forms is not None:
        by_nauty["same_class"] = first_forms.fingerprint == second_forms.fingerprint
        by_nauty["same_frame"] = first_forms.net_fingerprint == second_forms.net_fingerprint
    report: Report = {
        "params": [str(first), str(second)],
        "same_reading": same_reading,
        "evidence": {"same_reading": "algebra"},
        "algebra": {"same_reading": same_reading, **by_algebra},
        "nauty": dict(by_nauty),
        "disagreements": [],
        "reading_keys": [list(algebra.reading_key(first)), list(algebra.reading_key(second))],
        "class_keys": [list(algebra.class_key(first)), list(algebra.class_key(second))],
        "frame_keys": [_frame_key_list(first), _frame_key_list(second)],
        "fingerprints": [f.fingerprint if f else None for f in forms],
        "net_fingerprints": [f.net_fingerprint if f else None for f in forms],
        "notes": notes,
    }
    for level in ("same_class", "same_frame"):
        nauty_answer = by_nauty[level]
        if nauty_answer is None:
            report[level] = by_algebra[level]
            report["evidence"][level] = "algebra"
        elif nauty_answer == by_algebra[level]:
            report[level] = nauty_answer
            report["evidence"][level] = "both"
        else:
            report[level] = nauty_answer
            report["evidence"][level] = "nauty"
            report["disagreements"].append(level)
    # Levels nest: same reading implies same class implies same frame. Anything else is a bug
    # in one of the methods, and is reported like a disagreement.
    if (report["same_reading"] and not report["same_class"]) or (
        report["same_class"] and not report["same_frame"]
    ):
        report["disagreements"].append("nesting")
    # Put the three answers first, in level order, for readers of the raw JSON.
    ordered: Report = {"params": report.pop("params")}
    for level in LEVELS:
        ordered[level] = report.pop(level)
    # Behaviour: isomorphic reachability graphs (docs/theory/behaviour.md); null beyond the
    # state bound. Same class implies same behaviour, so only other pairs are searched.
    from zoo.core.behaviour import BEHAVIOUR_STATE_LIMIT, compare_behaviour

    if ordered["same_class"]:
        ordered["same_behaviour"] = True
        report["behaviour"] = {"evidence": "same class", "state_map": None}
    else:
        behaviour = compare_behaviour(first, second, BEHAVIOUR_STATE_LIMIT)
        ordered["same_behaviour"] = behaviour.same
        report["behaviour"] = {
            "evidence": behaviour.evidence,
            "state_map": list(behaviour.state_map) if behaviour.state_map is not None else None,
        }
    ordered.update(report)
    return ordered


def _frame_key_list(p: ParameterSet) -> list[int]:
    key = algebra.frame_key(p)
    return [key.area, key.g, key.r]


def disagreement_message(report: Report) -> str:
    """The one-line alarm for a compare report whose methods disagree (empty when they agree)."""
    if not report["disagreements"]:
        return ""
    first, second = report["params"]
    parts = []
    for level in report["disagreements"]:
        if level == "nesting":
            parts.append("the answers do not nest (reading => class => frame)")
        else:
            parts.append(
                f"{level}: algebra says {report['algebra'][level]}, "
                f"nauty says {report['nauty'][level]}"
            )
    return (
        f"algebra and nauty disagree for {first} and {second} ({'; '.join(parts)}); "
        "this is a bug in zoo, please report it with this command line"
    )


def exploration_report(p: ParameterSet, state_limit: int = DEFAULT_STATE_LIMIT) -> dict[str, Any]:
    """What ``zoo explore`` reports, as a JSON-ready dict (keys in docs/explore.md).

    The explicit side is zoo.core.reachability's breadth-first search; the formulas are
    docs/theory/README.md
    §10 (zoo.core.invariants). Raises LimitExceeded, naming --state-limit, when the search passes
    the limit, with the number of states the formula predicts.
    """
    from zoo.core.invariants import reachable_state_count, state_arc_count
    from zoo.core.net import build_net
    from zoo.core.reachability import (
        dead_transitions,
        is_one_safe,
        is_reversible,
        place_bound,
        reachability_graph,
    )

    formula_states, formula_arcs = reachable_state_count(p), state_arc_count(p)
    net = build_net(p)
    started = time.perf_counter()
    try:
        rg = reachability_graph(net, state_limit)
    except LimitExceeded as exc:
        predicted = (
            f"{formula_states:,}"
            if formula_states < 10**15
            else f"about 10^{len(str(formula_states)) - 1}"
        )
        raise LimitExceeded(f"{exc} (the closed formula predicts {predicted} states)") from None
    dead = dead_transitions(rg)
    facts = {
        "live": not dead,
        "one_safe": is_one_safe(rg),
        "reversible": is_reversible(rg),
        "dead_transitions": [net.transitions[t] for t in dead],
        "bound": place_bound(rg),
    }
    seconds = time.perf_counter() - started
    return {
        "params": {"alpha": p.alpha, "beta": p.beta, "gamma": p.gamma, "delta": p.delta},
        "label": str(p),
        "area": p.area,
        "places": net.place_count,
        "tokens": net.token_count,
        "state_limit": state_limit,
        "states": rg.state_count,
        "arcs": rg.arc_count,
        "formula_states": formula_states,
        "formula_arcs": formula_arcs,
        "states_agree": rg.state_count == formula_states,
        "arcs_agree": rg.arc_count == formula_arcs,
        **facts,
        "seconds": round(seconds, 6),
    }


def exploration_disagreement(report: dict[str, Any]) -> str:
    """The one-line alarm for an exploration report whose explicit counts differ from the
    closed formulas (empty when they agree)."""
    if report["states_agree"] and report["arcs_agree"]:
        return ""
    return (
        f"the explicit search of {report['label']} disagrees with the closed formulas (states "
        f"{report['states']:,} vs {report['formula_states']:,}, arcs {report['arcs']:,} vs "
        f"{report['formula_arcs']:,}); this is a bug in zoo, please report it with this "
        "command line"
    )
