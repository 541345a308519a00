"""``python -m verifier`` runs the qreferee command."""

import sys

from verifier.cli import main

sys.exit(main())
