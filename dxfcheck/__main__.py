"""``python -m dxfcheck``."""

from dxfcheck.cli import main

raise SystemExit(main())
