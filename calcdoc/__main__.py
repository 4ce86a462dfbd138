"""``python -m calcdoc`` runs the command line."""

import sys

from calcdoc.cli import main

sys.exit(main())
