"""``python -m fastmst``: the command line."""
import sys

from fastmst.cli import main

if __name__ == "__main__":
    sys.exit(main())
