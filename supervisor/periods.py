"""Breathing periods of a stop: oxygen periods and the air breaks between them.

A stop on oxygen with air breaks is never one continuous oxygen stop: it is its
periods in order, e.g. 30 min oxygen, 5 min air, 23 min oxygen.  This module
turns stops into their periods under the three conventions the project meets:

* the engine's in-water convention (:func:`cycle_periods`, :func:`cycle_across`):
  air breaks count in the stop minutes, and the (oxygen, air) cycle runs on
  across the oxygen stops;
* a table whose oxygen stop minutes leave the air breaks out
  (:func:`breaks_between`): a break after every full oxygen period, when more
  oxygen follows;
* the surface-decompression chamber pattern (:func:`chamber_pattern`): whole or
  half oxygen periods, the first half-period at the first chamber depth, the rest
  at the second, an air break after every full period that more oxygen follows;
* a plan, which writes each period as its own stop (:func:`merge_stops`).

A period is ``(gas name, minutes)``; :func:`periods_json` gives the JSON objects
``{"gas": ..., "minutes": ...}`` that every stop of the check and schedule JSON
carries under ``periods``.

References
----------
.. [1] U.S. Navy Diving Manual, Revision 7 (2016), ch. 9 "Air Decompression":
       in-water oxygen with a 5-min air break after 30 min on oxygen; surface
       decompression on oxygen in 30-min chamber periods, the first 15 min at
       50 fsw and 15 min at 40 fsw (as quoted by secondary sources).
.. [2] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 14: the same
       chamber layout for helium-oxygen surface decompression (older edition).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from typing import Any

from supervisor.gas import AIR, Gas, parse_gas

Period = tuple[str, float]

#: Oxygen fraction from which a gas takes air breaks (oxygen-rich) [-]; the engine's test.
OXYGEN_RICH_FO2 = 0.5
_EPS = 1e-9


def is_oxygen_rich(gas: Gas | str) -> bool:
    """Whether a gas is breathed in oxygen periods with air breaks (FO2 above 0.5)."""
    g = parse_gas(gas) if isinstance(gas, str) else gas
    return g.fo2 > OXYGEN_RICH_FO2


def _num(x: float) -> int | float:
    """Whole minutes as int, else rounded to 3 decimals (JSON-ready)."""
    return int(round(x)) if abs(x - round(x)) < 1e-9 else round(float(x), 3)


def merged(periods: Iterable[Period]) -> list[Period]:
    """Join neighbouring periods on the same gas and drop empty ones."""
    out: list[Period] = []
    for gas, minutes in periods:
        if minutes <= _EPS:
            continue
        if out and out[-1][0] == gas:
            out[-1] = (gas, out[-1][1] + minutes)
        else:
            out.append((gas, float(minutes)))
    return out


def cycle_periods(gas: str, minutes: float, o2_min: float, air_min: float,
                  start: float = 0.0) -> tuple[list[Period], float]:
    """Periods of a stop whose minutes count its air breaks (the engine's convention).

    Parameters
    ----------
    gas : str
        Gas of the stop (an oxygen-rich gas; other gases give one period).
    minutes : float
        Stop minutes, air breaks included [min].
    o2_min, air_min : float
        The cycle: oxygen minutes, then air minutes [min].
    start : float
        Position in the cycle on arrival [min from the start of an oxygen period].

    Returns
    -------
    (list of Period, float)
        The periods in order, and the cycle position on leaving.
    """
    if not is_oxygen_rich(gas) or o2_min <= 0 or air_min <= 0:
        return merged([(gas, minutes)]), start
    cyc = o2_min + air_min
    pos = start % cyc
    left = float(minutes)
    out: list[Period] = []
    while left > _EPS:
        if pos < o2_min - _EPS:
            take = min(left, o2_min - pos)
            out.append((gas, take))
        else:
            take = min(left, cyc - pos)
            out.append((AIR.name, take))
        left -= take
        pos = (pos + take) % cyc
        if abs(pos - cyc) < _EPS:
            pos = 0.0
    return merged(out), pos


def cycle_across(stops: Sequence[tuple[str, float]], o2_min: float | None,
                 air_min: float | None) -> list[list[Period]]:
    """Periods of consecutive stops whose minutes count the air breaks.

    The cycle starts with oxygen at the first oxygen-rich stop and runs on across
    the oxygen stops (:func:`cycle_periods`); a stop on another gas starts it
    again.  Without a period or break length every stop is one period.
    """
    out: list[list[Period]] = []
    pos = 0.0
    for gas, minutes in stops:
        if not o2_min or not air_min or not is_oxygen_rich(gas):
            out.append(merged([(gas, minutes)]))
            pos = 0.0
            continue
        periods, pos = cycle_periods(gas, minutes, o2_min, air_min, pos)
        out.append(periods)
    return out


def breaks_between(stops: Sequence[tuple[str, float]], o2_min: float | None,
                   air_min: float | None) -> list[list[Period]]:
    """Periods of consecutive stops whose oxygen minutes leave the air breaks out.

    After every ``o2_min`` minutes of oxygen an air break of ``air_min`` follows
    when more oxygen follows (in the same stop or the next); no break ends the
    oxygen time.  A stop on another gas starts the count again.  A break due at
    the end of a stop is taken at the start of the next oxygen stop.

    Parameters
    ----------
    stops : sequence of (gas, minutes)
        The stops in order; minutes are time on the stop's gas [min].
    o2_min, air_min : float or None
        Oxygen period and air break [min]; ``None`` or 0 gives no breaks.

    Returns
    -------
    list of list of Period
        One list per stop.
    """
    out: list[list[Period]] = []
    run = 0.0
    for gas, minutes in stops:
        if not o2_min or not air_min or not is_oxygen_rich(gas):
            out.append(merged([(gas, minutes)]))
            run = 0.0
            continue
        parts: list[Period] = []
        left = float(minutes)
        while left > _EPS:
            if run >= o2_min - _EPS:
                parts.append((AIR.name, float(air_min)))
                run = 0.0
            take = min(left, o2_min - run)
            parts.append((gas, take))
            run += take
            left -= take
        out.append(merged(parts))
    return out


def chamber_pattern(half_periods: int, first_depth: float, second_depth: float,
                    o2_min: float, air_min: float,
                    gas: str = "oxygen") -> list[tuple[float, list[Period]]]:
    """The chamber stops of surface decompression in whole and half oxygen periods.

    The first half-period is at ``first_depth``; the others at ``second_depth``;
    an air break follows every full period when more oxygen follows.  With both
    depths equal every period is at one stop.

    Parameters
    ----------
    half_periods : int
        Oxygen half-periods, >= 1 (1 = 0.5 period).
    first_depth, second_depth : float
        Chamber depths [unit].
    o2_min, air_min : float
        Oxygen period and air break [min]; a half-period is ``o2_min / 2``.
    gas : str
        Chamber gas.

    Returns
    -------
    list of (depth, periods)
        One entry per chamber stop, in order.
    """
    if half_periods < 1:
        return []
    half = o2_min / 2.0
    stops: list[tuple[float, list[Period]]] = [(first_depth, [(gas, half)])]
    for k in range(2, half_periods + 1):
        if abs(second_depth - stops[-1][0]) > _EPS:
            stops.append((second_depth, []))
        if k % 2 == 1:  # a full period is done and more oxygen follows
            stops[-1][1].append((AIR.name, float(air_min)))
        stops[-1][1].append((gas, half))
    return [(d, merged(p)) for d, p in stops]


def periods_json(periods: Iterable[Period]) -> list[dict[str, Any]]:
    """Periods as the JSON objects of the ``periods`` key: ``{"gas", "minutes"}``."""
    return [{"gas": g, "minutes": _num(m)} for g, m in periods]


def periods_text(periods: Sequence[Period]) -> str:
    """Periods in words, ``"O2 30, air 5, O2 23 min"``."""
    short = {"oxygen": "O2"}
    return ", ".join(f"{short.get(g, g)} {_num(m)}" for g, m in periods) + " min"


def stop_text(depth: float, minutes: float, gas: str, place: str, unit: str,
              periods: Sequence[Period] = ()) -> str:
    """One stop in words; a stop of more than one period shows them.

    ``"40 fsw 50 min oxygen (O2 15, air 5, O2 30 min) (chamber)"``.
    """
    text = f"{_num(depth)} {unit} {_num(minutes)} min {gas}"
    if len(periods) > 1:
        text += f" ({periods_text(periods)})"
    return text + (" (chamber)" if place == "chamber" else "")


def merge_stops(stops: Iterable[tuple[float, float, str, str]]) -> list[dict[str, Any]]:
    """A plan's stops as stops with periods: neighbours at one depth and place join.

    A plan writes each oxygen period and air break as its own stop at the same
    depth; here they become one stop whose ``periods`` list them in order.  The
    stop's gas is the gas it is taken on (the first gas other than air, else air)
    and its minutes are the periods' sum, air breaks included.

    Parameters
    ----------
    stops : iterable of (depth, minutes, gas name, place)
        The plan's stops in order.

    Returns
    -------
    list of dict
        ``depth``, ``minutes``, ``gas``, ``place`` and ``periods`` per stop.
    """
    out: list[dict[str, Any]] = []
    for depth, minutes, gas, place in stops:
        last = out[-1] if out else None
        if last is not None and last["place"] == place and abs(last["depth"] - depth) < _EPS:
            last["_periods"].append((gas, float(minutes)))
            continue
        out.append({"depth": depth, "place": place, "_periods": [(gas, float(minutes))]})
    for s in out:
        periods = merged(s.pop("_periods"))
        gases = [g for g, _ in periods if g != AIR.name]
        s["minutes"] = math.fsum(m for _, m in periods)
        s["gas"] = gases[0] if gases else AIR.name
        s["periods"] = periods_json(periods)
    return [{k: s[k] for k in ("depth", "minutes", "gas", "place", "periods")} for s in out]


def pattern_difference(plan_stops: Iterable[tuple[float, str, str]],
                       table_stops: Iterable[tuple[float, str, str]], unit: str) -> str | None:
    """Say plainly where a plan's oxygen pattern differs from a table's, or ``None``.

    The oxygen stops (an oxygen-rich gas) of each place are compared by depth: a
    plan taking chamber oxygen at 50 and 40 fsw against a table whose chamber stops
    are at 20 and 10 fsw follows another pattern, so comparing them stop by stop
    says nothing; cover is then a matter for the model.

    Parameters
    ----------
    plan_stops, table_stops : iterable of (depth, gas name, place)
        The stops of the plan and of the table's schedule, in the same unit.
    unit : str
        Depth unit, for the sentence.

    Returns
    -------
    str or None
        One sentence naming both patterns, or ``None`` when they agree.
    """
    def oxygen(stops: Iterable[tuple[float, str, str]]) -> dict[str, list[float]]:
        out: dict[str, list[float]] = {}
        for depth, gas, place in stops:
            if is_oxygen_rich(gas) and depth not in out.setdefault(place, []):
                out[place].append(depth)
        return out

    mine, theirs = oxygen(plan_stops), oxygen(table_stops)
    parts = []
    for place in ("water", "chamber"):
        a, b = mine.get(place, []), theirs.get(place, [])
        if sorted(a) != sorted(b):
            def show(ds: list[float]) -> str:
                return "/".join(f"{_num(d)}" for d in sorted(ds, reverse=True)) + f" {unit}" \
                    if ds else "none"
            parts.append(f"{place} oxygen at {show(a)} in the plan, {show(b)} in the table")
    if not parts:
        return None
    return ("the plan's oxygen pattern differs from the table's (" + "; ".join(parts)
            + "): the stops are not compared one by one; cover is judged by the model")
