"""Save or compare the text of the checklist PDF of every example and of the bench job.

Speed work on the PDF layout must leave what the PDF says alone.  Save the text
before the change, compare after it:

    .venv/bin/python bench/pdf_snapshot.py save out/pdf-before
    .venv/bin/python bench/pdf_snapshot.py compare out/pdf-before

Covered: every plan in ``examples/`` and the bench job (:mod:`weekjob`) at 10 and 50
dives (``--dives 200`` adds the 200-dive job), on letter paper (``--paper a4`` for
A4).  The check's time stamp is fixed.  The text of every page is extracted with
pypdf and compared line by line, pages included: ``compare`` prints the first
differing line of each plan (with its page) and exits 1 when any plan differs.
``--bytes`` also compares the PDF bytes (identical layout, not only identical text).
"""

from __future__ import annotations

import argparse
import datetime as dt
import hashlib
import io
import json
import sys
import tempfile
import tomllib
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from pypdf import PdfReader  # noqa: E402
from weekjob import write_plan  # noqa: E402

from supervisor.check import run_check  # noqa: E402
from supervisor.report.checklist import make_checklist  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
NOW = dt.datetime(2026, 1, 1, tzinfo=dt.UTC)


def _plans(tmp: Path, sizes: tuple[int, ...]) -> dict[str, Path]:
    plans = {p.stem: p for p in sorted((ROOT / "examples").glob("*.toml"))
             if tomllib.loads(p.read_text(encoding="utf-8")).get("schema") == "supervisor-plan/1"}
    for n in sizes:
        plans[f"weekjob-{n}"] = write_plan(n, tmp / f"weekjob-{n}.toml")
    return plans


def pdf_pages(path: Path, name: str, out: Path, paper: str) -> tuple[list[list[str]], str]:
    """The text lines of each page of the plan's checklist PDF, and the PDF's sha256."""
    res = run_check(path, now=NOW)
    res["plan_path"] = name  # the bench job is written to a temporary directory
    files = make_checklist(res, path.read_bytes(), out, paper=paper)
    data = files.pdf.read_bytes()
    reader = PdfReader(io.BytesIO(data))
    pages = [(page.extract_text() or "").splitlines() for page in reader.pages]
    return pages, hashlib.sha256(data).hexdigest()


def _first_difference(old: list[list[str]], new: list[list[str]]) -> str | None:
    for i, (a, b) in enumerate(zip(old, new, strict=False)):
        for j, (x, y) in enumerate(zip(a, b, strict=False)):
            if x != y:
                return f"page {i + 1} line {j + 1}: {x!r} != {y!r}"
        if len(a) != len(b):
            return f"page {i + 1}: {len(a)} != {len(b)} lines"
    if len(old) != len(new):
        return f"{len(old)} != {len(new)} pages"
    return None


def main(argv: list[str]) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("mode", choices=("save", "compare"))
    ap.add_argument("folder", type=Path)
    ap.add_argument("--dives", type=int, action="append", default=None,
                    help="bench job sizes (default 10 and 50)")
    ap.add_argument("--paper", default="letter", choices=("letter", "a4"))
    ap.add_argument("--bytes", action="store_true", help="also compare the PDF bytes")
    args = ap.parse_args(argv)
    sizes = tuple(args.dives or (10, 50))
    bad = 0
    args.folder.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory() as tmp:
        for name, path in _plans(Path(tmp), sizes).items():
            pages, digest = pdf_pages(path, name, Path(tmp) / f"out-{name}", args.paper)
            f = args.folder / f"{name}-{args.paper}.json"
            if args.mode == "save":
                f.write_text(json.dumps({"pages": pages, "sha256": digest}, indent=0),
                             encoding="utf-8")
                print(f"saved {f.name}: {len(pages)} pages")
                continue
            old = json.loads(f.read_text(encoding="utf-8"))
            diff = _first_difference(old["pages"], pages)
            if diff is None and args.bytes and old["sha256"] != digest:
                diff = "same text, other bytes"
            print(f"{name}: {'identical' if diff is None else 'DIFFERS at ' + diff}")
            bad += diff is not None
    return 1 if bad else 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
