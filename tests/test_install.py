"""The wheel carries its bundled data and runs outside the source tree.

Builds the wheel, installs it (without dependencies) into a fresh virtual
environment in a temporary folder, borrows the third-party dependencies of the
test environment through a path file, and runs ``supervisor --version`` and one
computation from a folder outside the project.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import sysconfig
import venv
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.slow
def test_wheel_runs_outside_the_source_tree(tmp_path):
    dist = tmp_path / "dist"
    subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "-q",
         "-w", str(dist), str(ROOT)],
        check=True, capture_output=True, text=True, timeout=300,
    )
    wheels = list(dist.glob("*.whl"))
    assert len(wheels) == 1
    names = zipfile.ZipFile(wheels[0]).namelist()
    for f in ROOT.joinpath("tables").rglob("*.toml"):
        assert f"supervisor/_bundled/tables/{f.relative_to(ROOT / 'tables').as_posix()}" in names
    for f in ROOT.joinpath("templates").rglob("*"):
        if f.is_file():
            rel = f.relative_to(ROOT / "templates").as_posix()
            assert f"supervisor/_bundled/templates/{rel}" in names

    env_dir = tmp_path / "env"
    venv.EnvBuilder(with_pip=False).create(env_dir)
    py = env_dir / ("Scripts" if os.name == "nt" else "bin") / "python"
    subprocess.run(
        [sys.executable, "-m", "pip", "--python", str(py), "install", "--no-deps", "-q",
         str(wheels[0])],
        check=True, capture_output=True, text=True, timeout=300,
    )
    site = subprocess.run(
        [str(py), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
        check=True, capture_output=True, text=True,
    ).stdout.strip()
    # dependencies from the test environment (its path files are not processed from here,
    # so an editable install of the project in it stays invisible)
    Path(site, "_borrowed_deps.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")
    run_env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME")}
    script = env_dir / "bin" / "supervisor"
    where = subprocess.run(
        [str(py), "-c", "import supervisor, supervisor.resources as r; "
         "print(supervisor.__file__); print(r.tables_dir())"],
        cwd=tmp_path, env=run_env, check=True, capture_output=True, text=True,
    ).stdout.split()
    assert all(str(ROOT) not in w for w in where), where
    assert "_bundled" in where[1]
    ver = subprocess.run([str(script), "--version"], cwd=tmp_path, env=run_env,
                         capture_output=True, text=True, check=False)
    assert ver.returncode == 0 and ver.stdout.startswith("supervisor ")
    out = subprocess.run(
        [str(script), "schedule", "--depth", "100", "--bottom-time", "30", "--json"],
        cwd=tmp_path, env=run_env, capture_output=True, text=True, check=False,
    )
    assert out.returncode == 0, out.stderr
    js = json.loads(out.stdout)
    assert js["schema"] == "supervisor.schedule/1" and js["stops"]
    # the record store's migration scripts ship in the wheel and run from it
    assert "supervisor/records/migrations/versions/r0001_records.py" in names
    (tmp_path / "log.csv").write_text("time_s,depth_fsw,gas\n0,0,air\n60,20,air\n120,0,air\n")
    db = str(tmp_path / "installed.sqlite3")
    for args in (["log", "read", "log.csv"],
                 ["records", "add", "plan", str(ROOT / "examples" / "demo-job.toml"), "--db", db],
                 ["records", "verify", "--db", db]):
        done = subprocess.run([str(script), *args], cwd=tmp_path, env=run_env,
                              capture_output=True, text=True, check=False)
        assert done.returncode == 0, done.stderr
    assert "INTACT" in done.stdout
