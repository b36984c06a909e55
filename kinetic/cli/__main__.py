"""``python -m kinetic.cli``: the same as the ``kinetic`` command."""
import sys

from . import main

sys.exit(main())
