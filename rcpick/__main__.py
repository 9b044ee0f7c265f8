"""``python -m rcpick`` runs the command line."""

from rcpick.cli import main

main()
