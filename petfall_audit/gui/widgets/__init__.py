"""Editing widgets of the main window; each takes the document it shows and edits via commands."""
