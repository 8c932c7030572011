"""Run the main job on the bundled demo data (``make demo``), from the project folder.

Checks the invented demo job in ``examples/demo-job.toml``, makes a demo signing
key for its fictional supervisor, adds the demo certificate to a demo company
keyring (``out/demo-keyring.toml``, never the user's own keyring), writes the
signed pre-dive checklist (PDF and JSON) to ``out/`` and verifies it against that
keyring, then records the plan in a fresh record store ``out/demo-records.sqlite3``,
audits the invented timed log of the surface-decompression dive D2 (one stop cut short)
against the plan and records the dive with its audit, records the invented recorder log
of D1, signed, and verifies the hash chain.  Then plans
the invented demo treatment (Treatment Table 6 in the job's deck chamber,
``examples/demo-treatment.toml``), writes its JSON to ``out/demo-treatment-plan.json`` and
logs it as run (``examples/demo-treatment-events.toml``, one late air break).  The demo
key's passphrase is a fixed demo value unless ``SUPERVISOR_KEY_PASSPHRASE`` is set; never
use it for a real key.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]  # the project folder (examples/..)
DEMO_PASSPHRASE = "demo-only-passphrase"


def _run(args: list[str], env: dict[str, str], ok: tuple[int, ...] = (0,)) -> int:
    print(f"\n$ supervisor {' '.join(args)}", flush=True)
    code = subprocess.run([sys.executable, "-m", "supervisor", *args], cwd=ROOT, env=env,
                          check=False).returncode
    if code not in ok:
        raise SystemExit(code)
    return code


TREATMENT_PLAN = ["treatment", "plan", "6", "--start", "21:40", "--plan",
                  str(Path("examples") / "demo-job.toml"), "--attendant-recent-dive",
                  "depth=50,bottom=30,since=4:30"]


def _treatment(env: dict[str, str], out: Path) -> None:
    """Plan the demo treatment, keep its JSON, and log the treatment as run."""
    _run(TREATMENT_PLAN, env)
    proc = subprocess.run([sys.executable, "-m", "supervisor", *TREATMENT_PLAN, "--json"],
                          cwd=ROOT, env=env, check=False, capture_output=True, text=True)
    if proc.returncode != 0:
        raise SystemExit(proc.returncode)
    plan_json = out / "demo-treatment-plan.json"
    (ROOT / plan_json).write_text(proc.stdout, "utf-8")
    print(f"treatment plan JSON written to {plan_json}")
    _run(["treatment", "log", str(plan_json),
          str(Path("examples") / "demo-treatment-events.toml")], env)


def main() -> int:
    """Run the demo and return an exit status."""
    plan = Path("examples") / "demo-job.toml"
    out = Path("out")
    (ROOT / out).mkdir(exist_ok=True)
    env = dict(os.environ)
    env.setdefault("SUPERVISOR_KEY_PASSPHRASE", DEMO_PASSPHRASE)
    # the verdict of the demo job is needs-review (0) or, if a rule fails, 1: both are shown
    _run(["check", str(plan)], env, ok=(0, 1))
    # signed checklists are never replaced, so the demo writes a fresh folder each run
    # and removes only the checklist files of its own previous run
    checklists = out / "demo-checklist"
    (ROOT / checklists).mkdir(exist_ok=True)
    for old in (ROOT / checklists).glob("*-checklist.*"):
        old.unlink()
    # the key is in the name of the demo job's (fictional) supervisor, Mara Okonjo
    key = out / "demo-mara-okonjo.p12"
    if not (ROOT / key).exists():
        _run(["keys", "new", "--name", "Mara Okonjo", "--out", str(key)], env)
    keyring = out / "demo-keyring.toml"
    _run(["keys", "trust", str(key.with_name("demo-mara-okonjo.cert.pem")), "--keyring",
          str(keyring)], env)
    _run(["checklist", str(plan), "--out", str(checklists), "--sign", str(key)], env, ok=(0, 1))
    pdfs = sorted((ROOT / checklists).glob("*-checklist.pdf"))
    for pdf in pdfs:
        _run(["verify", str(pdf.relative_to(ROOT)), "--keyring", str(keyring)], env)
    # after the dive: the timed log of D2 (its 40 fsw stop cut short) is audited against the
    # plan and recorded with its audit (it does not conform: status 1, shown); the recorder
    # log of D1 goes on record signed; the chain is verified
    db = out / "demo-records.sqlite3"
    for old in (ROOT / out).glob("demo-records.sqlite3*"):
        old.unlink()
    store = ["--db", str(db)]
    _run(["records", "add", "plan", str(plan), *store], env)
    logs = Path("examples") / "logs"
    _run(["audit", str(logs / "demo-d2-log.toml"), "--plan", str(plan), "--record", *store],
         env, ok=(1,))
    _run(["records", "add", "dive", str(logs / "demo-d1-recorder.csv"), "--job",
          "2026-06-03-outfall-diffuser-inspection-and-riser-clamp-change", "--dive", "D1",
          "--diver", "Teodor Lind", "--table", "usn-rev7-air-ndl", "--schedule", "50/50",
          "--no-exposure-24h", "--sign", str(key), *store], env)
    _run(["records", "list", *store], env)
    _run(["records", "verify", *store], env)
    _treatment(env, out)
    source = "SUPERVISOR_KEY_PASSPHRASE" if "SUPERVISOR_KEY_PASSPHRASE" in os.environ else (
        repr(DEMO_PASSPHRASE))
    print(f"\nsigned checklist written to {checklists}/, dive records to {db} (demo key "
          f"passphrase: {source}; demo only)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
