"""``python -m cmcheck`` runs the command line."""

from .cli.main import main

main()
