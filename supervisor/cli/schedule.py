"""``supervisor schedule``: a model decompression schedule for one dive (stable contract)."""

from __future__ import annotations

import math
import re

import typer

from supervisor.cli._common import fail_input, guarded, json_text, say
from supervisor.engine.schedule import ScheduleRequest, SurfaceDecompression, plan_schedule
from supervisor.gas import parse_gas
from supervisor.periods import periods_text
from supervisor.plan_ranges import rate_range
from supervisor.quantities import gf_percent_text
from supervisor.text import excerpt
from supervisor.units import altitude_pressure

#: Defaults by unit: descent rate, ascent rate, stop step, last stop.
UNIT_DEFAULTS = {
    "fsw": (75.0, 30.0, 10.0, 10.0),
    "msw": (23.0, 9.0, 3.0, 3.0),
}

#: Chamber depths of surface decompression by unit: first half-period, later periods.
#: 50 then 40 fsw (U.S. Navy Diving Manual Rev 7 ch. 9 as quoted by secondary sources;
#: Rev 4 Change A ch. 14, older edition); 15 then 12 msw (from memory).
CHAMBER_DEPTHS = {"fsw": (50.0, 40.0), "msw": (15.0, 12.0)}

_GF = re.compile(r"^\s*(\d+(?:\.\d+)?)\s*/\s*(\d+(?:\.\d+)?)\s*$")


def parse_gf(text: str) -> tuple[float, float]:
    """Parse ``LOW/HIGH`` gradient factors in percent into fractions."""
    m = _GF.match(text or "")
    if not m:
        fail_input("--gf", f"got {excerpt(text)}; expected LOW/HIGH percentages such as 30/85")
    lo, hi = float(m.group(1)), float(m.group(2))  # type: ignore[union-attr]
    for name, v in (("low", lo), ("high", hi)):
        if not 1.0 <= v <= 100.0:
            fail_input("--gf", f"{name} {v:g} is outside 1-100 %")
    if lo > hi:
        fail_input("--gf", f"low {lo:g} is above high {hi:g}; expected LOW <= HIGH")
    return lo / 100.0, hi / 100.0


def parse_deco_gas(text: str) -> tuple[str, float]:
    """Parse ``GAS@DEPTH`` (e.g. ``oxygen@20``, ``50/0@70``)."""
    gas, sep, depth = (text or "").rpartition("@")
    if not sep or not gas:
        fail_input("--deco-gas",
                   f"got {excerpt(text)}; expected GAS@DEPTH such as oxygen@20 or 50/0@70")
    try:
        d = float(depth)
        if not math.isfinite(d):
            raise ValueError
    except ValueError:
        fail_input("--deco-gas",
                   f"got depth {excerpt(depth)} in {excerpt(text)}; expected a number such as 20")
    parse_gas(gas, "--deco-gas")
    return gas, d


def _parse_break(text: str | None, option: str) -> tuple[float, float] | None:
    if text is None:
        return None
    m = _GF.match(text)
    if not m or float(m.group(1)) <= 0 or float(m.group(2)) <= 0:
        fail_input(option, f"got {excerpt(text)}; expected GAS_MIN/AIR_MIN such as 30/5")
    return float(m.group(1)), float(m.group(2))  # type: ignore[union-attr]


def _surface_pressure(altitude_m: float) -> float:
    if not (-500.0 <= altitude_m <= 6000.0):  # also refuses NaN
        fail_input("--altitude", f"got {altitude_m!r} m; expected -500 to 6000 m above sea level")
    return float(altitude_pressure(altitude_m))


def _table(js: dict) -> str:
    u = js["unit"]
    lines = [
        f"{js['depth']} {u} for {js['bottom_time_min']} min on {js['gas']}  "
        f"[{js['model']} GF {js['gf_low_percent']:g}/{js['gf_high_percent']:g}; "
        f"coefficients {js['coefficient_status']}]",
        "no-stop limit: "
        + ("unlimited" if js["no_stop_limit_min"] is None else f"{js['no_stop_limit_min']} min"),
    ]
    if js["stops"]:
        lines.append(f"{'stop':>8}  {'min':>5}  {'gas':<8} {'place':<8} periods")
        for s in js["stops"]:
            periods = [(p["gas"], p["minutes"]) for p in s.get("periods") or []]
            shown = periods_text(periods) if len(periods) > 1 else ""
            lines.append(f"{s['depth']:>5} {u}  {s['minutes']:>5}  {s['gas']:<8} "
                         f"{s['place']:<8} {shown}".rstrip())
        if js.get("chamber_o2_periods") is not None:
            lines.append(f"chamber oxygen: {js['chamber_o2_periods']:g} period(s) of "
                         f"{js['chamber_period_min']:g} min (model: the least number of "
                         "half-periods that clears the obligation)")
    else:
        lines.append("no decompression stops")
    ox = js["oxygen"] or {}
    cns, otu = ox.get("cns_percent"), ox.get("otu")
    lines.append(
        f"total stop time {js['total_stop_min']} min; ascent {js['total_ascent_min']:.1f} min; "
        f"surfacing GF {gf_percent_text(js['surfacing_gf_percent'])} (compartment "
        f"{js['controlling_compartment']})"
    )
    low = ox.get("cns_is_lower_bound") or ox.get("out_of_range")
    cns_text = ("n/a" if cns is None else
                f"at least {math.floor(cns * 10 + 1e-9) / 10:.1f} % (lower bound)" if low else
                f"{cns:.1f} %")
    chamber = ox.get("chamber_oxygen")
    lines.append(
        ("oxygen: in-water CNS " if chamber else "oxygen: CNS ")
        + cns_text
        + ", OTU "
        + ("n/a" if otu is None else f"{otu:.0f}")
        + (" (PO2 above the CNS table in the water: needs review)" if low else "")
    )
    if chamber:
        lines.append(
            f"chamber oxygen: {chamber['minutes']:.0f} min, {chamber['otu']:.0f} OTU, PO2 up to "
            f"{chamber['max_po2_atm']:.2f} atm; no in-water CNS percentage (counted as chamber "
            "oxygen periods against the procedure's limits)"
        )
    if js.get("surface_interval_max_gf_percent") is not None:
        lines.append(
            f"surface interval: peak supersaturation {js['surface_interval_max_gf_percent']:.0f} % "
            "of the M-value gradient"
        )
    for w in js.get("warnings", []):
        lines.append(f"warning: {w}")
    lines.append("Model output for review by a qualified supervisor; not a published table.")
    return "\n".join(lines)


def register(app: typer.Typer) -> None:
    """Add the ``schedule`` command."""

    @app.command("schedule")
    @guarded
    def schedule(
        depth: float = typer.Option(..., "--depth", help="Bottom depth, in --unit."),
        bottom_time: float = typer.Option(
            ..., "--bottom-time", help="Bottom time [min], from leaving the surface."
        ),
        unit: str = typer.Option("fsw", "--unit", help="Depth unit: fsw or msw."),
        gas: str = typer.Option("air", "--gas", help="Bottom gas: air, oxygen, O2/He e.g. 32/0."),
        model: str = typer.Option("zhl16c", "--model", help="zhl16a, zhl16b or zhl16c."),
        gf: str = typer.Option("30/85", "--gf", help="Gradient factors LOW/HIGH in percent."),
        descent_rate: float = typer.Option(
            None, "--descent-rate", help="Descent rate [unit/min] (75 fsw, 23 msw)."
        ),
        ascent_rate: float = typer.Option(
            None, "--ascent-rate", help="Ascent rate [unit/min] (30 fsw, 9 msw)."
        ),
        stop_step: float = typer.Option(None, "--stop-step", help="Stop spacing (10 fsw, 3 msw)."),
        last_stop: float = typer.Option(
            None, "--last-stop", help="Shallowest stop (10 fsw, 3 msw)."
        ),
        deco_gas: list[str] = typer.Option(
            [], "--deco-gas", help="Decompression gas GAS@DEPTH, e.g. oxygen@20 (repeatable)."
        ),
        o2_air_break: str = typer.Option(
            None, "--o2-air-break", help="Air breaks on in-water oxygen, O2_MIN/AIR_MIN e.g. 30/5."
        ),
        surd: float = typer.Option(
            None,
            "--surface-decompression",
            help="Surface decompression: leave the water after the stop at this depth.",
        ),
        surd_interval: float = typer.Option(
            None, "--surface-interval",
            help="Surface decompression interval [min] (5; with --surface-decompression).",
        ),
        chamber_depth: float = typer.Option(
            None, "--chamber-depth",
            help="Chamber depth of the first oxygen half-period (50 fsw, 15 msw; with "
            "--surface-decompression).",
        ),
        chamber_second_depth: float = typer.Option(
            None, "--chamber-second-depth",
            help="Chamber depth of the later oxygen periods (40 fsw, 12 msw; with "
            "--surface-decompression).",
        ),
        chamber_compression_rate: float = typer.Option(
            None, "--chamber-compression-rate",
            help="Chamber compression rate [unit/min] (default: the descent rate; with "
            "--surface-decompression).",
        ),
        chamber_air_break: str = typer.Option(
            None, "--chamber-air-break",
            help="Chamber oxygen/air periods, e.g. 30/5 (the default; with "
            "--surface-decompression).",
        ),
        altitude: float = typer.Option(0.0, "--altitude", help="Site altitude [m]."),
        water: str = typer.Option("salt", "--water", help="salt or fresh."),
        as_json: bool = typer.Option(False, "--json", help="Print one JSON object."),
    ) -> None:
        """Compute a model decompression schedule (ZH-L16 with gradient factors)."""
        if unit not in UNIT_DEFAULTS:
            fail_input("--unit", f"got {excerpt(unit)}; expected fsw or msw")
        if water not in ("salt", "fresh"):
            fail_input("--water", f"got {excerpt(water)}; expected salt or fresh")
        dd, da, ds, dl = UNIT_DEFAULTS[unit]
        lo, hi = parse_gf(gf)
        chamber_options = {"--surface-interval": surd_interval, "--chamber-depth": chamber_depth,
                           "--chamber-second-depth": chamber_second_depth,
                           "--chamber-compression-rate": chamber_compression_rate,
                           "--chamber-air-break": chamber_air_break}
        if surd is None:
            for option, value in chamber_options.items():
                if value is not None:
                    fail_input(option, f"got {excerpt(value)} without --surface-decompression; "
                               "it applies only to surface decompression (give "
                               "--surface-decompression DEPTH, or leave the option out)")
        given_rates = {"--descent-rate": descent_rate, "--ascent-rate": ascent_rate,
                       "--chamber-compression-rate": chamber_compression_rate}
        slowest, fastest = rate_range(unit)
        for option, rate in given_rates.items():
            if rate is not None and not slowest <= rate <= fastest:  # also refuses nan
                fail_input(option, f"got {rate:g}; expected a rate from {slowest:g} to "
                           f"{fastest:g} {unit}/min")
        sd = None
        if surd is not None:
            first, second = CHAMBER_DEPTHS[unit]
            c1 = first if chamber_depth is None else chamber_depth
            if chamber_second_depth is None:
                # the default second depth, or the first when it is given shallower than that
                c2 = min(second, c1) if math.isfinite(c1) else second
            else:
                c2 = chamber_second_depth
            sd = SurfaceDecompression(
                leave_water_depth=surd,
                surface_interval_min=5.0 if surd_interval is None else surd_interval,
                chamber_depth=c1,
                chamber_gas="oxygen",
                air_break=_parse_break(chamber_air_break or "30/5", "--chamber-air-break"),
                compression_rate=chamber_compression_rate,
                second_depth=c2,
            )
        req = ScheduleRequest(
            depth=depth,
            bottom_time_min=bottom_time,
            unit=unit,
            gas=gas,
            model=model,
            gf_low=lo,
            gf_high=hi,
            descent_rate=dd if descent_rate is None else descent_rate,
            ascent_rate=da if ascent_rate is None else ascent_rate,
            stop_step=ds if stop_step is None else stop_step,
            last_stop=dl if last_stop is None else last_stop,
            deco_gases=tuple(parse_deco_gas(x) for x in deco_gas),
            p_surface_bar=_surface_pressure(altitude),
            water=water,
            o2_air_break=_parse_break(o2_air_break, "--o2-air-break"),
            surface_decompression=sd,
        )
        js = plan_schedule(req).to_json()
        if as_json:
            typer.echo(json_text(js))
        else:
            for line in _table(js).splitlines():
                say(line)
