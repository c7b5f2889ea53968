"""``python -m wellfault.cli``: the ``wellfault`` command."""

import sys

from .app import main

sys.exit(main())
