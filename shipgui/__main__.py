"""``python -m shipgui`` and the desktop bundle's entry point (absolute imports:
PyInstaller runs this file as a script, outside its package)."""

import sys

if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == "--prepare-kernels":
        # A child process that compiles kernels for the first start
        # (shipgui.core.prepare); it needs nothing else.
        from shipgui.core.prepare import child_main
        sys.exit(child_main(sys.argv[2:]))
    from shipgui.cli import main
    sys.exit(main())
