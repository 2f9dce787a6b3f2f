import sys

from steelfire.cli import main

sys.exit(main())
