"""``python -m hcfplan`` runs the command line."""

import sys

from hcfplan.cli.app import main

sys.exit(main())
