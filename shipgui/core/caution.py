"""The caution every output carries: on stdout, in the app and on every printed page."""

__all__ = ["CAUTION"]

CAUTION = ("Travel times are estimates. Drivers' hours and rest rules are set by local law. "
           "The dispatcher decides and is responsible.")
