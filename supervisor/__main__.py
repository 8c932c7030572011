"""``python -m supervisor`` runs the command line."""

from supervisor.cli import main

main()
