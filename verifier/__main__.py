"""`python -m verifier` is the `verifier` command."""

import sys

from .cli import main

sys.exit(main())
