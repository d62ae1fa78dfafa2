"""``python -m graphinv``."""

from graphinv.cli import main

main()
