"""``python -m roomcalc``: the same as the ``roomcalc`` command."""

from roomcalc.cli import main

raise SystemExit(main())
