"""``python -m shipgui.gui [FILE]``: the desktop app without the command line wrapper."""

import sys

from .app import run

if __name__ == "__main__":
    sys.exit(run(sys.argv[1:]))
