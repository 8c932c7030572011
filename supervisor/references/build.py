"""Decompression tables computed by this project from ZH-L16 (``supervisor tables build``).

These are model output laid out as a table, not a published table: every file
says so in its title and provenance (source status ``COMPUTED``), names the
model, the gradient factors, the rates and the status of the coefficients, and
records no date, so that a build is reproducible byte for byte.

Every schedule comes from :func:`supervisor.engine.schedule.plan_schedules`,
the same code path as ``supervisor schedule``, in one vectorised batch over all
rows of a table.  Each depth gets a row at its no-stop limit (no stops), then
one row per bottom time of :data:`BOTTOM_TIMES` beyond the limit, up to and
including the first bottom time whose total stop time exceeds the
``max_stop_time`` of the build (a choice of this build, not a published limit).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from supervisor.engine.buhlmann import load_coefficients
from supervisor.engine.schedule import ScheduleRequest, ScheduleResult, plan_schedules
from supervisor.errors import InputError
from supervisor.references.canonical import atomic_write_text, dumps_table
from supervisor.references.loader import InvalidTableError, inspect_document
from supervisor.references.schema import SCHEMA_ID

#: Bottom times tried at every depth beyond its no-stop limit [min].
BOTTOM_TIMES: tuple[int, ...] = (
    5, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 70, 80, 90, 100, 110, 120, 130, 140, 150,
    160, 170, 180, 200, 220, 240, 270, 300, 330, 360, 400, 450, 480,
)


@dataclass(frozen=True)
class BuildSpec:
    """One computed table: unit, depth grid, rates, stop grid and gradient factors.

    Parameters
    ----------
    unit : {"fsw", "msw"}
        Depth unit.
    depths : tuple of float
        Table depths [unit].
    descent_rate, ascent_rate : float
        Rates [unit/min].
    stop_step, last_stop : float
        Stop spacing and shallowest stop [unit].
    gf_low, gf_high : float
        Gradient factors [-].
    model : str
        Coefficient set.
    max_stop_time : float
        The rows of a depth end with the first bottom time whose total stop
        time exceeds this [min].
    """

    unit: str
    depths: tuple[float, ...]
    descent_rate: float
    ascent_rate: float
    stop_step: float
    last_stop: float
    gf_low: float = 0.30
    gf_high: float = 0.85
    model: str = "zhl16c"
    max_stop_time: float = 180.0

    @property
    def name(self) -> str:
        """File stem, e.g. ``zhl16c-gf30-85-air-fsw``."""
        return (f"{self.model}-gf{round(self.gf_low * 100)}-{round(self.gf_high * 100)}"
                f"-air-{self.unit}")


#: The two bundled computed tables: 30-190 fsw with stops every 10 fsw, and the
#: metric variant 9-57 msw with stops every 3 msw.  Rates and stop grids are the
#: defaults of ``supervisor schedule``.
FSW_SPEC = BuildSpec("fsw", tuple(float(d) for d in range(30, 200, 10)), 75.0, 30.0, 10.0, 10.0)
MSW_SPEC = BuildSpec("msw", tuple(float(d) for d in range(9, 60, 3)), 23.0, 9.0, 3.0, 3.0)


def model_title(model: str) -> str:
    """Display name of a coefficient set: ``zhl16c`` -> ``ZH-L16C``."""
    return f"ZH-L16{model[-1].upper()}" if model.startswith("zhl16") else model


def _request(spec: BuildSpec, depth: float, bottom_time: float) -> ScheduleRequest:
    return ScheduleRequest(
        depth=depth, bottom_time_min=bottom_time, unit=spec.unit, gas="air", model=spec.model,
        gf_low=spec.gf_low, gf_high=spec.gf_high, descent_rate=spec.descent_rate,
        ascent_rate=spec.ascent_rate, stop_step=spec.stop_step, last_stop=spec.last_stop,
    )


def _num(x: float) -> int | float:
    r = round(float(x), 2)
    return int(r) if r.is_integer() else r


def _row(spec: BuildSpec, res: ScheduleResult) -> dict[str, Any]:
    req = res.request
    stops = [{"depth": _num(s.depth), "minutes": int(s.minutes), "gas": "air",
              "place": "water"} for s in res.stops]
    row: dict[str, Any] = {"depth": _num(req.depth), "bottom_time": _num(req.bottom_time_min)}
    if res.stops:
        row["time_to_first_stop"] = _num((req.depth - res.stops[0].depth) / spec.ascent_rate)
    row.update({
        "repetitive_group": "",
        "exceptional_exposure": False,
        "note": f"model surfacing supersaturation {100 * res.surfacing_gf:.0f} % of the M-value "
                f"gradient (compartment {res.controlling_compartment})",
        "air": {"stops": stops, "total_ascent": _num(res.total_ascent_min)},
        "source_status": "COMPUTED",
        "verification": "unverified", "verified_by": "", "verified_on": "",
        "verification_method": "", "row_hash": "",
    })
    return row


def build_rows(spec: BuildSpec) -> tuple[list[dict[str, Any]], list[ScheduleResult]]:
    """Compute the rows of one table.

    Two vectorised passes of :func:`plan_schedules`: one for the no-stop limit
    at every depth, one for every (depth, bottom time) beyond it.

    Parameters
    ----------
    spec : BuildSpec

    Returns
    -------
    tuple
        (raw rows in depth then bottom-time order, the engine results behind them).
    """
    depths = np.asarray(spec.depths, dtype=float)
    first = [max(1.0, float(np.ceil(d / spec.descent_rate))) for d in depths]
    probe = plan_schedules([_request(spec, float(d), t) for d, t in zip(depths, first,
                                                                          strict=True)])
    requests: list[ScheduleRequest] = []
    for d, pr in zip(depths, probe, strict=True):
        ndl = pr.no_stop_limit_min
        times = [float(t) for t in BOTTOM_TIMES if ndl is None or t > ndl]
        if ndl is not None and ndl >= d / spec.descent_rate:
            times = [float(ndl)] + times
        requests += [_request(spec, float(d), t) for t in times
                     if t >= d / spec.descent_rate]
    results = plan_schedules(requests)
    stop_time = np.array([r.total_stop_min for r in results], dtype=float)
    depth_of = np.array([r.request.depth for r in results])
    keep = np.ones(len(results), dtype=bool)
    for d in depths:
        idx = np.nonzero(depth_of == d)[0]
        over = idx[stop_time[idx] > spec.max_stop_time]
        if over.size:
            keep[idx[idx > over[0]]] = False  # keep the first row beyond the cap, drop the rest
    kept = [r for r, k in zip(results, keep, strict=True) if k]
    return [_row(spec, r) for r in kept], kept


def build_document(spec: BuildSpec) -> dict[str, Any]:
    """Return the table document of a build (deterministic: no date, no version)."""
    rows, _ = build_rows(spec)
    coeff = load_coefficients(spec.model)
    status = coeff.status_for(False)
    gf = f"{round(spec.gf_low * 100)}/{round(spec.gf_high * 100)}"
    mt = model_title(spec.model)
    u = spec.unit
    depths = f"{spec.depths[0]:g}-{spec.depths[-1]:g} {u}"
    return {
        "schema": SCHEMA_ID,
        "name": spec.name,
        "kind": "decompression",
        "title": f"Air decompression schedules computed by this project from {mt} "
                 f"with gradient factors {gf} ({depths}): model output, not a published table",
        "provenance": {
            "source_document": f"Computed by this project (supervisor tables build) from the "
                               f"Bühlmann {mt} decompression model with gradient factors; "
                               "not a published table",
            "issuing_body": "this project (computed; not issued by any diving authority)",
            "edition": f"model {spec.model}, gradient factors {gf}, coefficients {status}",
            "table": f"air, in-water air stops every {spec.stop_step:g} {u}, {depths}",
            "date": "not recorded: computed, so that the build is reproducible byte for byte",
            "licence": "output of this project's software (MIT licence); no published table "
                       "is reproduced",
            "source_status": "COMPUTED",
            "transcribed_by": "supervisor tables build",
            "transcribed_on": "",
            "notes": f"Every schedule is the engine's (the same as `supervisor schedule` with "
                     f"the same options). The {spec.model} coefficients used have source "
                     f"status {status}; the schedules are no more certain than that. Model "
                     "output for planning review, not a table issued by any authority. "
                     "Regenerate with `supervisor tables build`.",
        },
        "conventions": {
            "depth_unit": u,
            "bottom_time_definition": "from leaving the surface (descent included) to leaving "
                                      "the bottom",
            "depth_rounding": "next-deeper",
            "time_rounding": "next-longer",
            "ascent_rate": float(spec.ascent_rate),
            "stop_depth_reference": "the model treats the stop depth as the pressure at the "
                                    "diver",
            "gas": "air",
            "place": "water",
            "repetitive_groups": [],
            "model": {
                "name": spec.model,
                "gf_low": float(spec.gf_low),
                "gf_high": float(spec.gf_high),
                "descent_rate": float(spec.descent_rate),
                "coefficient_status": status,
                "max_stop_time": float(spec.max_stop_time),
                "bottom_times": [float(t) for t in BOTTOM_TIMES],
            },
            "notes": f"Stops whole minutes, travel at {spec.ascent_rate:g} {u}/min excluded; "
                     f"descent at {spec.descent_rate:g} {u}/min. Each depth starts at its "
                     "model no-stop limit; its rows end with the first bottom time whose total "
                     f"stop time exceeds {spec.max_stop_time:g} min (a choice of this build).",
            "stop_step": float(spec.stop_step),
            "last_stop": float(spec.last_stop),
            "stop_time_includes_travel": False,
        },
        "rows": rows,
    }


def build_tables(out_dir: str | Path, specs: tuple[BuildSpec, ...] = (FSW_SPEC, MSW_SPEC),
                 force: bool = False) -> list[tuple[Path, str]]:
    """Compute and write the tables; refuse to replace a different file without ``force``.

    Parameters
    ----------
    out_dir : str or Path
        Folder to write into (created if missing).
    specs : tuple of BuildSpec
        Tables to build.
    force : bool
        Replace an existing file whose content differs (it may hold verification
        records that the new file would not).

    Returns
    -------
    list of (Path, str)
        Each file and what happened: ``written``, ``unchanged`` or ``replaced``.

    Raises
    ------
    InputError
        If a file exists with other content and ``force`` is not given (nothing
        is written then).
    InvalidTableError
        If a computed table fails validation (nothing is written).
    """
    out = Path(out_dir)
    texts: list[tuple[Path, str]] = []
    for spec in specs:
        doc = build_document(spec)
        path = out / f"{spec.name}.toml"
        table, issues = inspect_document(doc, path, strict=True)
        if table is None:
            raise InvalidTableError(path, issues)
        texts.append((path, dumps_table(doc)))
    for path, text in texts:
        if path.exists() and path.read_text("utf-8") != text and not force:
            raise InputError("--out-dir", f"{path} exists with other content (it may hold "
                             "verification records); give --force to replace it")
    done = []
    out.mkdir(parents=True, exist_ok=True)
    for path, text in texts:
        if path.exists() and path.read_text("utf-8") == text:
            done.append((path, "unchanged"))
            continue
        state = "replaced" if path.exists() else "written"
        atomic_write_text(path, text)
        done.append((path, state))
    return done
