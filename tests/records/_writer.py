"""A record writer run as a separate process by the fault tests.

``python -m tests.records._writer DB MODE N TAG [MARKER]``

* ``many``: append N records one transaction each (the concurrency test);
* ``slow-batch``: append N records in one batch, touching MARKER after the first
  insert and then pausing before each next one, so the test can kill the
  process in the middle of the batch.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

from supervisor.records.store import NewRecord, RecordStore


def main(argv: list[str]) -> int:
    db, mode, n, tag = argv[0], argv[1], int(argv[2]), argv[3]
    store = RecordStore.open(db)
    if mode == "many":
        for i in range(n):
            store.append(NewRecord("job", {"writer": tag, "i": i}, job=tag))
        return 0
    marker = Path(argv[4])

    def pause(_rec: object) -> None:
        marker.touch()
        time.sleep(0.5)

    store.append_batch([NewRecord("job", {"writer": tag, "i": i}, job=tag) for i in range(n)],
                       _after_each=pause)
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
