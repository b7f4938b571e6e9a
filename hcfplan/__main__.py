"""``python -m hcfplan`` runs the command line."""

import sys

try:
    from hcfplan.cli.app import main
except KeyboardInterrupt:  # Ctrl-C while the command line loads: one line, as in a command
    sys.stderr.write("hcfplan: interrupted; nothing written\n")
    sys.exit(130)

sys.exit(main())
