"""Work behind the window: solving in the background, autosave, stored preferences."""
