"""``python -m cmcheck`` runs the command line."""

from .cli.app import main

main()
