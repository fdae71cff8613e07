import sys

from robtui.cli import main

sys.exit(main())
