"""Run the main job on the bundled demo data (``make demo``)."""

from __future__ import annotations


def main() -> int:
    """Run the demo and return an exit status."""
    from supervisor.cli import app

    app(["schedule", "--depth", "100", "--unit", "fsw", "--bottom-time", "30", "--gas", "air"],
        standalone_mode=False)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
