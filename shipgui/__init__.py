"""shipgui: the minimum number of vehicles for a day of booked jobs, with proof."""

__version__ = "0.1.0"
