"""``python -m spaceframe`` runs the command line."""

from .cli import main

main()
