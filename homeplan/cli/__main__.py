"""``python -m homeplan.cli``: the same as the ``homeplan`` command."""

import sys

from homeplan.cli import main

sys.exit(main())
