import sys

from partpick.cli import main

sys.exit(main())
