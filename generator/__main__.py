"""Allow ``python -m generator``."""

from .cli import main

raise SystemExit(main())
