"""Allow ``python -m inkshift``."""

from inkshift.cli import main

main()
