"""Qt models over the day being edited, and the undo commands that change it."""
