"""A throwaway PostgreSQL cluster for the record-store tests.

The cluster is made with the distribution's ``initdb`` in a new temporary
folder, listens on a free loopback port only (no Unix socket), trusts local
connections, and is stopped and removed at the end of the test session.

``initdb`` refuses to run as root.  As root, the cluster runs as the
``postgres`` system user that the distribution's package creates (through
``runuser``), or as a system user made for the purpose when there is none; as
a normal user it runs as that user.

When the server cannot be had (no PostgreSQL installed, ``initdb`` fails) the
PostgreSQL tests are skipped with the reason, unless the environment variable
``SUPERVISOR_REQUIRE_POSTGRES`` is set (``.ci/run`` sets it): then they fail.
"""

from __future__ import annotations

import glob
import os
import pwd
import shutil
import socket
import subprocess
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

REQUIRE_ENV = "SUPERVISOR_REQUIRE_POSTGRES"
SUPERUSER = "supervisor"
_FALLBACK_USER = "supervisor-pgtest"


class Unavailable(Exception):
    """PostgreSQL cannot be started here; the message says why."""


def find_bindir() -> Path:
    """The folder holding ``initdb`` and ``pg_ctl``: PATH, ``pg_config``, or Debian's layout."""
    for name in ("initdb", "pg_ctl"):
        found = shutil.which(name)
        if found:
            folder = Path(found).resolve().parent
            if (folder / "initdb").exists() and (folder / "pg_ctl").exists():
                return folder
    pg_config = shutil.which("pg_config")
    if pg_config:
        out = subprocess.run([pg_config, "--bindir"], capture_output=True, text=True,
                             check=False).stdout.strip()
        if out and (Path(out) / "initdb").exists():
            return Path(out)
    # Debian and Ubuntu keep the server programs off PATH, one folder per major version
    versions = sorted(glob.glob("/usr/lib/postgresql/*/bin/initdb"),
                      key=lambda p: int(Path(p).parts[-3]) if Path(p).parts[-3].isdigit() else 0)
    if versions:
        return Path(versions[-1]).parent
    raise Unavailable("PostgreSQL server programs (initdb, pg_ctl) not found; install the "
                      "distribution's postgresql package")


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _server_user() -> str | None:
    """The user to run the server as when we are root (None: run as ourselves)."""
    if os.geteuid() != 0:
        return None
    for name in ("postgres", _FALLBACK_USER):
        try:
            pwd.getpwnam(name)
            return name
        except KeyError:
            continue
    subprocess.run(["useradd", "--system", "--no-create-home", "--shell", "/usr/sbin/nologin",
                    _FALLBACK_USER], check=True, capture_output=True)
    return _FALLBACK_USER


@dataclass
class Cluster:
    """A running cluster: its folder, port and the user it runs as."""

    bindir: Path
    root: Path
    port: int
    user: str | None

    @property
    def data(self) -> Path:
        return self.root / "data"

    def _run(self, args: list[str], timeout: float = 120) -> subprocess.CompletedProcess[str]:
        cmd = args if self.user is None else ["runuser", "-u", self.user, "--", *args]
        return subprocess.run(cmd, capture_output=True, text=True, timeout=timeout,
                              check=False, cwd=self.root)

    def url(self, database: str = "postgres") -> str:
        """A ``postgresql://`` URL of a database on this cluster."""
        return f"postgresql://{SUPERUSER}@127.0.0.1:{self.port}/{database}"

    def start(self) -> None:
        init = self._run([str(self.bindir / "initdb"), "-D", str(self.data), "-U", SUPERUSER,
                          "--auth=trust", "-E", "UTF8", "--locale=C", "--no-sync"])
        if init.returncode != 0:
            raise Unavailable(f"initdb failed: {' '.join((init.stderr or init.stdout).split())}")
        opts = (f"-c listen_addresses=127.0.0.1 -p {self.port} -c unix_socket_directories='' "
                "-c fsync=off -c synchronous_commit=off -c full_page_writes=off "
                "-c max_connections=60")
        started = self._run([str(self.bindir / "pg_ctl"), "-D", str(self.data), "-l",
                             str(self.root / "server.log"), "-o", opts, "-w", "-t", "60",
                             "start"])
        if started.returncode != 0:
            log = (self.root / "server.log")
            tail = log.read_text(errors="replace")[-400:] if log.exists() else ""
            raise Unavailable(f"pg_ctl start failed: {' '.join(started.stderr.split())} "
                              f"{' '.join(tail.split())}")

    def stop(self) -> None:
        self._run([str(self.bindir / "pg_ctl"), "-D", str(self.data), "-m", "immediate",
                   "-w", "stop"], timeout=60)
        shutil.rmtree(self.root, ignore_errors=True)

    def create_database(self, name: str, template: str | None = None) -> str:
        """Create a database (empty, or a copy of ``template``) and return its URL."""
        import psycopg

        with psycopg.connect(f"host=127.0.0.1 port={self.port} user={SUPERUSER} "
                             "dbname=postgres", autocommit=True) as conn:
            copy = f' TEMPLATE "{template}"' if template else ""
            conn.execute(f'CREATE DATABASE "{name}"{copy}')
        return self.url(name)


def start_cluster() -> Cluster:
    """Start a throwaway cluster, or raise :class:`Unavailable`."""
    bindir = find_bindir()
    user = _server_user()
    root = Path(tempfile.mkdtemp(prefix="supervisor-pg-"))
    if user is not None:
        info = pwd.getpwnam(user)
        os.chown(root, info.pw_uid, info.pw_gid)
    os.chmod(root, 0o700)
    cluster = Cluster(bindir=bindir, root=root, port=_free_port(), user=user)
    try:
        cluster.start()
    except Exception:
        shutil.rmtree(root, ignore_errors=True)
        raise
    deadline = time.monotonic() + 30
    while time.monotonic() < deadline:  # pg_ctl -w waits already; this is a last guard
        try:
            with socket.create_connection(("127.0.0.1", cluster.port), timeout=1):
                return cluster
        except OSError:
            time.sleep(0.2)
    cluster.stop()
    raise Unavailable("the PostgreSQL server did not accept connections in 30 s")
