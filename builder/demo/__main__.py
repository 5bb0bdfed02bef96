"""``python -m builder.demo records/ [--force]``: write the invented demo shop."""
import sys

from builder.demo import main

sys.exit(main())
