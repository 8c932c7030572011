"""Assumptions of the per-dive analysis: planning figures and where they come from.

Each is printed with the figure it affects.

=============================  ==================  ===============================================
name                           value               source
=============================  ==================  ===============================================
RMV_LPM                        1.4 acfm = 39.6 L   U.S. Navy Diving Manual Rev 4 Change A 8-2.2.2,
                               per min             demand-helmet average (OLDER-EDITION)
CABIN_ALTITUDE_M               8,000 ft = 2438 m   NOAA Diving Center newsletter *Topside* 2(9),
                                                   1999, on the Navy flying-after-diving table
                                                   (OLDER-EDITION)
REPETITIVE_WINDOW_MIN          12 h                U.S. Navy Diving Manual Rev 4 Change A ch. 9
                                                   (OLDER-EDITION)
DAY_WINDOW_MIN                 24 h                Navy flying rule: highest group in the previous
                                                   24 h (OLDER-EDITION); NOAA 24-hour CNS limits
OVERRUN_INCREMENT_MIN          10 min              common practice, no source (used only when no
                                                   decompression table gives the next longer time)
SURD_INTERVAL_MIN              5 min               U.S. Navy Diving Manual Rev 7 ch. 9 SurDO2
                                                   surface interval (SECONDARY); defined in
                                                   supervisor.plan
SURD_CHAMBER_DEPTH_FSW         50 fsw              idem (SECONDARY)
O2_SWITCH_DEPTH_FSW            30 fsw              in-water oxygen stops at 30 and 20 fsw
                                                   (FROM MEMORY for Rev 7)
O2_AIR_BREAK                   30 min O2 / 5 air   Rev 7 ch. 9 (SECONDARY)
EGS_BOTTOM_MIN                 5 min               Navy ch. 8 EGS sample problem states five
                                                   minutes (its arithmetic uses three); the larger
                                                   is used (OLDER-EDITION)
NAVY_VENT_O2_ACFM              12.5 acfm           per person on oxygen from BIBS with no overboard
                                                   dump, U.S. Navy Diving Manual Rev 4 Change A
                                                   §22-5.4 (OLDER-EDITION); defined in
                                                   supervisor.chamber.ventilation
NAVY_VENT_AIR_REST_ACFM,       2 / 4 acfm          per person breathing chamber air at rest / not
NAVY_VENT_AIR_WORK_ACFM                            at rest, idem (OLDER-EDITION); used for an
                                                   overboard dump (FROM MEMORY)
TREATMENT_DEPTH_FSW            60 fsw              U.S. Navy Treatment Table 6 oxygen depth,
                                                   Rev 4 Change A ch. 21 (OLDER-EDITION); used
                                                   only when the plan gives a treatment duration
                                                   of its own (the default is the bundled Table 6
                                                   timeline, supervisor.analysis.chamber)
TREATMENT_MIN                  285 min             Treatment Table 6, 4 h 45 min (steps FROM
                                                   MEMORY); used only when the plan gives a
                                                   treatment depth of its own
CHAMBER_OCCUPANTS              2                   patient and one inside tender (common practice,
                                                   no source)
=============================  ==================  ===============================================

References
----------
.. [1] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 8 (air supply,
       EGS) and ch. 9 (repetitive dives, altitude, flying after diving).
.. [2] U.S. Navy Diving Manual, Revision 7 Change A (2018), ch. 9, as quoted by
       secondary sources (surface decompression on oxygen, in-water oxygen).
.. [3] 46 CFR 197.340, breathing gas supply (primary, secondary, diver-carried
       reserve; chamber for the dive plus one hour).
.. [4] U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 21 (treatment
       tables) and §22-5.4 (chamber ventilation).
"""

from __future__ import annotations

from supervisor import constants as C
from supervisor.chamber.ventilation import (
    L_PER_FT3,
    NAVY_VENT_AIR_REST_ACFM,
    NAVY_VENT_AIR_WORK_ACFM,
    NAVY_VENT_O2_ACFM,
)
from supervisor.errors import SupervisorError
from supervisor.plan import SURD_INTERVAL_MIN

#: Errors a computation may raise on bad or out-of-range input; they become a
#: recorded error (and a "needs review" finding), never a traceback.
COMPUTE_ERRORS: tuple[type[BaseException], ...] = (
    SupervisorError,
    ValueError,
    ArithmeticError,
)
RMV_LPM: float = 1.4 * L_PER_FT3
RMV_SOURCE = "1.4 acfm demand-helmet average, U.S. Navy Diving Manual Rev 4 Change A 8-2.2.2"
CABIN_ALTITUDE_M: float = 8000 * C.M_PER_FT
REPETITIVE_WINDOW_MIN: float = 12 * 60.0
DAY_WINDOW_MIN: float = 24 * 60.0
OVERRUN_INCREMENT_MIN: float = 10.0
SURD_CHAMBER_DEPTH_FSW: float = 50.0
O2_SWITCH_DEPTH_FSW: float = 30.0
O2_AIR_BREAK: tuple[float, float] = (30.0, 5.0)
EGS_BOTTOM_MIN: float = 5.0
MARGIN_CAP_MIN: int = 120
ALTITUDE_SEARCH_MAX_MIN: int = 72 * 60
TREATMENT_DEPTH_FSW: float = 60.0
TREATMENT_MIN: float = 285.0
CHAMBER_OCCUPANTS: int = 2
#: Tolerance when matching a proposed stop with a reference stop, as a share of the stop step.
STOP_MATCH_FRACTION: float = 0.1

__all__ = [
    "ALTITUDE_SEARCH_MAX_MIN",
    "CABIN_ALTITUDE_M",
    "CHAMBER_OCCUPANTS",
    "COMPUTE_ERRORS",
    "DAY_WINDOW_MIN",
    "EGS_BOTTOM_MIN",
    "L_PER_FT3",
    "MARGIN_CAP_MIN",
    "NAVY_VENT_AIR_REST_ACFM",
    "NAVY_VENT_AIR_WORK_ACFM",
    "NAVY_VENT_O2_ACFM",
    "O2_AIR_BREAK",
    "O2_SWITCH_DEPTH_FSW",
    "OVERRUN_INCREMENT_MIN",
    "REPETITIVE_WINDOW_MIN",
    "RMV_LPM",
    "RMV_SOURCE",
    "STOP_MATCH_FRACTION",
    "SURD_CHAMBER_DEPTH_FSW",
    "SURD_INTERVAL_MIN",
    "TREATMENT_DEPTH_FSW",
    "TREATMENT_MIN",
]
