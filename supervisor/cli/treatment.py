"""``supervisor treatment``: plan a recompression treatment and log it as run.

Exit status
-----------
plan  0 planned (needs review: the bundled tables are from memory); 1 the plan's own
      chamber cannot run it (too shallow, or short of gas on the plan's own figures);
      2 bad input (unknown table, bad start time, an extension the table does not allow).
log   0 the treatment as run conforms or needs review; 1 a deviation fails (e.g. an
      ascent faster than the table's rate, chamber oxygen above 25 %); 2 bad input.
"""

from __future__ import annotations

from pathlib import Path

import typer

from supervisor.cli._common import EXIT_FAIL, EXIT_OK, json_text, say
from supervisor.cli.plan import plan_errors

treatment_app = typer.Typer(
    name="treatment",
    help="Recompression treatments: plan one from a treatment table, log it as run.",
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
)

_EXT_OXYGEN = ("Extra oxygen periods, as the table allows them: Table 5: N more 20-min oxygen "
               "periods at 30 fsw (no air break between them or before the ascent), up to 2; "
               "Tables 6 and 6A: N more 25-min periods at 60 fsw (20 min oxygen, then a 5-min "
               "air break), up to 2.")
_EXT_AIR = ("Extra air-break-and-oxygen periods at 30 fsw: Tables 6 and 6A: N more 75-min "
            "periods (a 15-min air break, then 60 min oxygen), up to 2.")


@treatment_app.command("plan")
@plan_errors
def plan(
    table: str = typer.Argument(..., metavar="TABLE", help="Published treatment table number: "
                                "5, 6, 6A, 9 (4, 7, 8, 1A, 2A and 3 are bundled but cannot be "
                                "planned from the bundled source)."),
    start: str = typer.Option(..., "--start", help="Clock time of leaving the surface, HH:MM "
                              "(00:00 to 23:59); the plan runs across midnight."),
    extend_oxygen: int = typer.Option(0, "--extend-oxygen", metavar="N", help=_EXT_OXYGEN),
    extend_air: int = typer.Option(0, "--extend-air", metavar="N", help=_EXT_AIR),
    attendant_recent_dive: str = typer.Option(
        None, "--attendant-recent-dive", metavar="SPEC",
        help="The inside attendant's dive before the treatment: depth=DEPTH,bottom=MIN,"
             "since=H:MM[,gas=GAS] (depth in fsw, or e.g. 18msw; since = from surfacing to the "
             "start). Within 12 h it adds the table's recent-exposure oxygen; the model carries "
             "its inert gas into the treatment."),
    job_plan: Path = typer.Option(None, "--plan", metavar="PLAN", help="Job plan (TOML) whose "
                                  "chamber (volumes, flasks, ventilation, occupants), policy "
                                  "(model, gradient factors) and site are used."),
    as_json: bool = typer.Option(False, "--json", help="Print the supervisor.treatment/1 JSON "
                                 "object."),
) -> None:
    """Plan a treatment: clock-time steps, doses, the attendant, the rules around it, the chamber.

    The plan supports the chamber operator's and the diving medical officer's decision; the
    governing procedure and the diving medical officer decide.  Steps marked FROM MEMORY
    must be checked against the current manual before use.
    """
    from supervisor.chamber.attendant import parse_recent_dive
    from supervisor.chamber.render import plan_lines
    from supervisor.chamber.treatment import TreatmentRequest, plan_treatment

    recent = parse_recent_dive(attendant_recent_dive) if attendant_recent_dive else None
    req = TreatmentRequest(table.strip(), start.strip(), extend_oxygen, extend_air, recent,
                           str(job_plan) if job_plan is not None else None)
    result = plan_treatment(req).to_json()
    if as_json:
        typer.echo(json_text(result))
    else:
        for line in plan_lines(result):
            say(line)
    raise typer.Exit(EXIT_FAIL if result["verdict"] == "does-not-conform" else EXIT_OK)


@treatment_app.command("log")
@plan_errors
def log(
    planfile: Path = typer.Argument(..., metavar="PLANFILE", help="The treatment plan: the JSON "
                                    "of `treatment plan --json`, or a TOML treatment plan "
                                    "(schema supervisor.treatment-plan/1)."),
    events: Path = typer.Argument(..., metavar="EVENTS", help="The actual times, TOML (schema "
                                  "supervisor.treatment-events/1): each step's end, extensions, "
                                  "interruptions, the patient's state, chamber readings."),
    as_json: bool = typer.Option(False, "--json", help="Print the supervisor.treatment-log/1 "
                                 "JSON object."),
) -> None:
    """Record a treatment as run against its plan; flag every deviation with its citation.

    Exit 0 conforms or needs review, 1 a deviation fails, 2 bad input.
    """
    from supervisor.chamber.log import log_treatment
    from supervisor.chamber.render import log_lines

    result = log_treatment(planfile, events).to_json()
    if as_json:
        typer.echo(json_text(result))
    else:
        for line in log_lines(result):
            say(line)
    raise typer.Exit(EXIT_FAIL if result["verdict"] == "does-not-conform" else EXIT_OK)


def register(app: typer.Typer) -> None:
    """Add the ``treatment`` sub-app to the application."""
    app.add_typer(treatment_app, name="treatment")
