"""Fixtures for the checklist report tests.

``check_result`` is a ``supervisor.check/1`` object written by hand to follow
the contract at the end of DEVELOPERS.md key for key.  The job, people and
numbers are fictional and illustrative: they are neither computed by the
engine nor taken from any table, and no test compares them with an outside
value; tests only check that the report prints what the check says.
"""

from __future__ import annotations

import copy
import hashlib
import os
from pathlib import Path
from typing import Any

import pytest

PLAN_TEXT = """\
# fictional demo plan used by the report tests
[job]
title = "Harbour outfall inspection"
"""


def _stops(*rows: tuple[float, float, str, str]) -> list[dict[str, Any]]:
    return [{"depth": d, "minutes": m, "gas": g, "place": p} for d, m, g, p in rows]


def _check(plan_sha256: str) -> dict[str, Any]:
    t = [0.0, 1.3, 31.3, 33.0, 33.2, 40.2, 40.5, 58.5, 58.8]
    depth = [0.0, 100.0, 100.0, 20.0, 20.0, 20.0, 10.0, 10.0, 0.0]
    ceiling = [None, 2.0, 24.5, 17.0, 16.5, 9.5, 9.0, 0.0, 0.0]
    return {
        "schema": "supervisor.check/1",
        "tool_version": "0.1.0",
        "generated_at": "2031-05-14T06:30:00Z",
        "plan_sha256": plan_sha256,
        "plan_path": "examples/harbour-outfall.toml",
        "job": {
            "title": "Harbour outfall inspection",
            "site": "North Mole, Port Example",
            "date": "2031-05-14",
            "client": "Example Port Authority",
            "supervisor": "Dana Whitcombe",
            "jurisdiction": "OSHA 29 CFR 1910 Subpart T",
            "contractor": "Fictional Subsea Ltd",
        },
        "unit": "fsw",
        "verdict": "does-not-conform",
        "counts": {"fail": 1, "warn": 2, "info": 1, "pass": 1},
        "findings": [
            {"rule": "osha-423-c1", "severity": "fail",
             "message": "No chamber at the dive location for a dive deeper than 100 fsw.",
             "measured": "none", "limit": "at the dive location", "unit": None,
             "citation": "29 CFR 1910.423(c)(1)", "dive": "D1", "source_status": "VERIFIED"},
            {"rule": "gas-supply-reserve", "severity": "warn",
             "message": "Dive-location reserve covers the planned decompression "
                        "with little margin.",
             "measured": 1.12, "limit": 1.5, "unit": None,
             "citation": "29 CFR 1910.425(c)(4)", "dive": "D1", "source_status": "VERIFIED"},
            {"rule": "table-row-unverified", "severity": "warn",
             "message": "Reference table row not verified by a second person.",
             "measured": None, "limit": None, "unit": None,
             "citation": "DEVELOPERS.md, reference-table files", "dive": "D1",
             "source_status": "FROM MEMORY"},
            {"rule": "oxygen-cns", "severity": "info",
             "message": "CNS oxygen exposure for the dive.",
             "measured": 23.7, "limit": 100, "unit": "%",
             "citation": "NOAA Diving Manual CNS limits", "dive": "D1",
             "source_status": "SECONDARY"},
            {"rule": "osha-425-b1", "severity": "pass",
             "message": "Surface-supplied air depth within the limit.",
             "measured": 100, "limit": 190, "unit": "fsw",
             "citation": "29 CFR 1910.425(b)(1)", "dive": "D1", "source_status": "FROM MEMORY"},
        ],
        "references": [
            {"name": "usn-air-decompression", "title": "Air decompression table",
             "edition": "Rev 7 Change A", "source_status": "SECONDARY",
             "verification": "unverified"},
            {"name": "zhl16c", "title": "ZH-L16C nitrogen coefficients",
             "edition": "as transcribed", "source_status": "FROM MEMORY",
             "verification": "unverified"},
        ],
        "model": {"name": "zhl16c", "gf_low": 0.3, "gf_high": 0.85,
                  "coefficient_status": "FROM MEMORY"},
        "dives": [
            {
                "id": "D1",
                "diver": "Morgan Ellery",
                "mode": "ss_air",
                "gas": "air",
                "max_depth": 100,
                "bottom_time_min": 30,
                "decompression": "in-water",
                "proposed_stops": _stops((20, 7, "air", "in-water"), (10, 18, "air", "in-water")),
                "reference_schedule": {
                    "table": "usn-air-decompression",
                    "depth": 100,
                    "bottom_time_min": 30,
                    "stops": _stops((20, 4, "air", "in-water"), (10, 21, "air", "in-water")),
                    "repetitive_group": "K",
                    "outside_table": False,
                    "row_verification": "unverified",
                    "exceptional_exposure": False,
                },
                "model_schedule": {
                    "stops": _stops((30, 2, "air", "in-water"), (20, 6, "air", "in-water"),
                                    (10, 24, "air", "in-water")),
                    "total_stop_min": 32,
                    "total_ascent_min": 35.3,
                    "no_stop_limit_min": 19.5,
                },
                "model_margin": {"ceiling_broken": False, "surfacing_gf_percent": 81.4,
                                 "controlling_compartment": "5", "margin_min": 3.5},
                "oxygen": {"po2_by_phase": {"bottom": 0.85, "decompression": 0.34,
                                            "chamber": None},
                           "max_po2": 0.85, "cns_percent": 23.7, "otu": 41.2},
                "gas_supply": {"need_l": 9600, "available_l": 10750,
                               "reserve_l": 4000, "flow_lpm": 125},
                "contingency": {
                    "overrun": {"bottom_time_min": 40,
                                "stops": _stops((20, 9, "air", "in-water"),
                                                (10, 31, "air", "in-water")),
                                "total_stop_min": 40},
                    "deeper": {"depth": 110, "bottom_time_min": 30,
                               "stops": _stops((20, 11, "air", "in-water"),
                                               (10, 33, "air", "in-water")),
                               "total_stop_min": 44},
                    "oxygen_failure": None,
                },
                "chart": {"t_min": t, "depth": depth, "ceiling_depth": ceiling},
                "compartments": {
                    "labels": [str(i) for i in range(1, 17)],
                    "loading_percent_of_limit": [38.0, 55.5, 70.2, 78.9, 81.4, 80.1, 74.3,
                                                 66.0, 58.2, 50.4, 44.1, 39.0, 34.8, 30.2,
                                                 27.5, 25.1],
                    "surfacing_gf_percent": [-5.0, 20.3, 41.2, 55.0, 81.0, 58.1, 50.3,
                                             40.0, 30.2, 21.4, 12.1, 5.0, 1.8, -2.2,
                                             -4.5, -6.1],
                },
            }
        ],
        "team": [
            {"name": "Dana Whitcombe", "role": "dpic", "first_aid_cpr": True},
            {"name": "Morgan Ellery", "role": "diver", "first_aid_cpr": True},
            {"name": "Sam Okafor", "role": "standby", "first_aid_cpr": True},
            {"name": "Riley Haugen", "role": "tender", "first_aid_cpr": None},
        ],
        "chamber": {"at_location": False, "ready": True, "depth_capability_fsw": 165,
                    "locks": 2, "travel_min": 25},
        "cautions": ["Demo job: all names and numbers are fictional."],
    }


@pytest.fixture()
def plan_bytes() -> bytes:
    """Bytes of the fictional plan the fixture check was made from."""
    return PLAN_TEXT.encode("utf-8")


@pytest.fixture()
def check_result(plan_bytes: bytes) -> dict[str, Any]:
    """A hand-written ``supervisor.check/1`` object (fresh copy per test)."""
    return copy.deepcopy(_check(hashlib.sha256(plan_bytes).hexdigest()))


@pytest.fixture(scope="session")
def identity_files(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, str]:
    """An EC signing key made once per session, and its passphrase."""
    from supervisor.report.keys import new_identity

    folder = tmp_path_factory.mktemp("keys")
    passphrase = "correct horse battery"
    files = new_identity("Dana Whitcombe", folder / "dana.p12", passphrase)
    return files.key, passphrase


@pytest.fixture()
def no_passphrase_env(monkeypatch: pytest.MonkeyPatch) -> None:
    """Make sure the passphrase variable from the developer's shell is not used."""
    monkeypatch.delenv("SUPERVISOR_KEY_PASSPHRASE", raising=False)
    assert "SUPERVISOR_KEY_PASSPHRASE" not in os.environ


@pytest.fixture(scope="session")
def signed_checklist(tmp_path_factory: pytest.TempPathFactory,
                     identity_files: tuple[Path, str]) -> Any:
    """The fixture job's checklist, signed once per session (tests copy the files)."""
    from supervisor.report.checklist import make_checklist
    from supervisor.report.keys import load_identity

    plan = PLAN_TEXT.encode("utf-8")
    identity = load_identity(*identity_files)
    out = tmp_path_factory.mktemp("signed")
    return make_checklist(_check(hashlib.sha256(plan).hexdigest()), plan, out,
                          identity=identity)


@pytest.fixture(scope="session")
def trusted(tmp_path_factory: pytest.TempPathFactory,
            identity_files: tuple[Path, str]) -> Any:
    """A company keyring holding the session key's certificate (a list for ``keyrings=``)."""
    from supervisor.report import keyring
    from supervisor.report.keys import certificate_path

    path = tmp_path_factory.mktemp("keyring") / "company.toml"
    empty = keyring.load_keyring(path, label="company keyring", field="--keyring",
                                 must_exist=False)
    cert = keyring.load_certificate(certificate_path(identity_files[0]), field="CERT")
    keyring.trust(empty, cert)
    return [keyring.load_keyring(path, label="company keyring", field="--keyring",
                                 must_exist=True)]
