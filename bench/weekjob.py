"""Write an invented multi-day job of N dives, for the check and checklist benchmarks.

A fictional scenario: the contractor, vessel, site, client and people are invented
and any likeness to real ones is accidental.  Not a plan to dive by.

Six divers work from the invented dive support vessel *Marram Sound* on an intake
structure.  Each working day holds seven surface-supplied air dives: one surface
decompression on oxygen in the deck chamber, a deeper dive with in-water stops,
no-stop dives, and repetitive dives after a surface interval on deck; divers rotate
so each takes the day's deep dive in turn, and every diver's first dive of a day
follows the night's rest (a 14-hour surface interval).  Stops are those of the
bundled computed reference table the policy names (zhl16c-gf30-85-air-fsw), as a
supervisor copies them from the job's table.  50 dives is a working week; any N
can be written (``--dives``), so cost per dive can be measured from 10 to 200.

Run: ``.venv/bin/python bench/weekjob.py --dives 50 --out week.toml``.
"""

from __future__ import annotations

import argparse
import datetime as dt
from pathlib import Path

from supervisor.references import load_table
from supervisor.references.lookup import lookup_schedule

TABLE = "zhl16c-gf30-85-air-fsw"
DIVERS = ("Anouk Verhey", "Basil Ferreira", "Cato Lindqvist", "Dara Mwangi", "Eske Holm",
          "Farah Quist")
#: Members who stand by (also divers): the standby of a dive is one not in the water.
STANDBY = ("Dara Mwangi", "Eske Holm", "Farah Quist")
NIGHT_MIN = 840.0  # surface interval over the night [min]

#: One working day: (slot, depth fsw, bottom time min, mode, surface interval in the day).
#: Slots index the day's rotation of divers; a second dive of a slot is repetitive.
DAY: tuple[tuple[int, float, float, str, float | None], ...] = (
    (0, 110.0, 35.0, "surd_o2", None),  # surface decompression on oxygen
    (1, 80.0, 40.0, "air", None),       # in-water air stops
    (2, 50.0, 50.0, "air", None),
    (3, 40.0, 60.0, "air", None),
    (4, 60.0, 30.0, "air", None),
    (2, 35.0, 40.0, "air", 150.0),      # repetitive, after 150 min on deck
    (5, 45.0, 45.0, "air", None),
)
#: Small day-to-day changes of depth [fsw] and bottom time [min] (a real week varies).
VARY = ((0, 0), (5, -5), (-5, 5), (0, 5), (5, 0), (-5, -5), (0, -5))

HEADER = """\
# Bench job: a fictional scenario written by bench/weekjob.py.  The contractor,
# vessel, site, client and people are invented; any likeness to real ones is
# accidental.  Not a plan to dive by.
schema = "supervisor-plan/1"
unit = "fsw"

[job]
title = "Intake screen refurbishment, {n} dives over {days} days"
site = "Ostrel Point cooling-water intake, screens 1-6"
date = {date}
client = "Ostrel Point Generating Co-operative"
contractor = "Corvid Bay Diving"
supervisor = "Hollis Brannagh"
jurisdiction = "osha-1910-t"

[site]
water = "salt"
altitude_m = 0
current_kt = 0.4
visibility_m = 3
water_temperature_c = 13
confined_space = false
marine_traffic = false
from_vessel = true
night = false
first_aid_kit = true
first_aid_handbook = true
resuscitator = true
tables_on_site = true
safe_practices_manual = true
emergency_comms = true
diver_voice_comms = true

[site.emergency_contacts]
chamber = "Deck chamber on Marram Sound (on site); back-up: Ostrel County hyperbaric unit, 555-0172"
hospital = "Ostrel County Hospital, 555-0170"
physician = "Dr. Wren Achterberg, diving medical officer, 555-0173"
transport = "Ostrel harbour launch, channel 16 / 555-0175"
uscg_rcc = "District rescue coordination center, 555-0199"

[chamber]
on_site = true
ready = true
depth_capability = 225
locks = 2
multiplace = true
travel_time_min = 2
operator_available = true
lock_volumes_l = [4200, 1800]
bibs_overboard_dump = true
treatment_occupants = 2

[chamber.air_supply]
gas = "air"
water_volume_l = 800
pressure_bar = 300

[chamber.equipment]
pressure_gauges = true
bibs_masks = 4
voice_comms = true
viewport = true
interior_lighting = true
treatment_tables = true
treatment_gas = true

[[team]]
name = "Hollis Brannagh"
role = "supervisor"
first_aid_cpr = true
physics_physiology = true
"""

FOOTER = """
[[team]]
name = "Ivo Castellane"
role = "tender"
first_aid_cpr = true
physics_physiology = true

[[team]]
name = "Juno Pellworm"
role = "chamber-operator"
first_aid_cpr = true
physics_physiology = true

[gas_supply.primary]
kind = "compressor"
gas = "air"
delivery_lpm = 900
delivery_pressure_bar = 14

[gas_supply.secondary]
kind = "hp-bank"
gas = "air"
water_volume_l = 300
pressure_bar = 200
{bailout}
[gas_supply.oxygen_decompression]
gas = "oxygen"
water_volume_l = 100
pressure_bar = 200

[gas_supply.oxygen_treatment]
gas = "oxygen"
water_volume_l = 200
pressure_bar = 200

[policy]
model = "zhl16c"
gf_low = 30
gf_high = 85
po2_bottom_max = 1.4
po2_decompression_max = 1.6
po2_chamber_max = 2.8
reference_table = "{table}"
descent_rate_max = 75
ascent_rate = 30
"""


def _team() -> str:
    out = []
    for name in DIVERS:
        role = '["diver", "standby-diver"]' if name in STANDBY else '"diver"'
        out.append(f'\n[[team]]\nname = "{name}"\nrole = {role}\nfirst_aid_cpr = true\n'
                   "physics_physiology = true\n")
    return "".join(out)


def _bailout() -> str:
    return "".join(f'\n[[gas_supply.bailout]]\ndiver = "{n}"\ngas = "air"\n'
                   "water_volume_l = 7\npressure_bar = 200\n" for n in DIVERS)


def _stops(table, depth: float, bt: float, mode: str) -> list[tuple[float, float, str, str]]:
    look = lookup_schedule(table, depth, bt, mode)  # type: ignore[arg-type]
    if look.outside_table or look.schedule is None:
        raise SystemExit(f"{depth:g} fsw / {bt:g} min is outside {TABLE} ({look.reason})")
    return [(s.depth, s.minutes, s.gas, s.place) for s in look.schedule.stops]


def stops_needed(table, depth: float, bt: float, mode: str) -> bool:
    """Whether the table schedule of a dive has stops."""
    return bool(_stops(table, depth, bt, mode))


def dives(n: int) -> list[str]:
    """TOML blocks of ``n`` dives (whole days of :data:`DAY`, the last one cut short)."""
    table = load_table(TABLE)
    blocks: list[str] = []
    seen: set[str] = set()
    day = 0
    while len(blocks) < n:
        dd, dt_ = VARY[day % len(VARY)]
        in_day: dict[str, str] = {}
        for k, (slot, depth, bt, mode, si) in enumerate(DAY):
            if len(blocks) >= n:
                break
            diver = DIVERS[(slot + day) % len(DIVERS)]
            depth2, bt2 = depth + dd, bt + dt_
            # the supervisor enters the table one schedule longer (5 min) for the day's
            # surface decompression and for a decompression dive of a diver still loaded
            # from an earlier dive (common practice, no source)
            longer = mode == "surd_o2" or diver in seen
            stops = _stops(table, depth2, bt2 + (5 if longer and stops_needed(
                table, depth2, bt2, mode) else 0), mode)
            dive_id = f"W{day + 1}-{k + 1}"
            standby = next(s for s in STANDBY if s != diver)
            if not stops:
                deco = "none"
            elif mode == "surd_o2":
                deco = "surface-oxygen"
            else:
                deco = "in-water"
            lines = [
                "[[dives]]", f'id = "{dive_id}"', f'diver = "{diver}"',
                'mode = "surface-supplied-air"', 'gas = "air"', f"max_depth = {depth2:g}",
                f"bottom_time_min = {bt2:g}", "descent_rate = 60", "ascent_rate = 30",
                f'decompression = "{deco}"', "line_tended = true",
                f'standby_diver = "{standby}"', 'tender = "Ivo Castellane"',
            ]
            if si is not None and diver in in_day:
                lines += [f'previous_dive = "{in_day[diver]}"', f"surface_interval_min = {si:g}"]
            elif diver in seen:
                lines.append(f"surface_interval_min = {NIGHT_MIN:g}")
            if deco == "surface-oxygen":
                lines.append("surface_transfer_min = 3")
            if stops:
                lines += ["stage = true", "standby_hose = true"]
            if stops:
                lines.append("stops = [")
                lines += [f'  {{ depth = {d:g}, minutes = {m:g}, gas = "{g}", place = "{p}" }},'
                          for d, m, g, p in stops]
                lines.append("]")
            blocks.append("\n".join(lines) + "\n")
            in_day[diver] = dive_id
            seen.add(diver)
        day += 1
    return blocks


def write_plan(n: int, path: Path) -> Path:
    """Write the plan of ``n`` dives to ``path`` and return it."""
    body = dives(n)
    days = -(-n // len(DAY))
    head = HEADER.format(n=n, days=days, date=dt.date(2026, 9, 7).isoformat())
    text = head + _team() + FOOTER.format(bailout=_bailout(), table=TABLE) + "\n" + "\n".join(body)
    path.write_text(text, encoding="utf-8")
    return path


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--dives", type=int, default=50, help="number of dives (default 50)")
    ap.add_argument("--out", type=Path, required=True, help="plan file to write")
    a = ap.parse_args()
    write_plan(a.dives, a.out)


if __name__ == "__main__":
    main()
