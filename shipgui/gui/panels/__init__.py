"""The window's panels: each a widget that shows one part of the day or the answer."""
