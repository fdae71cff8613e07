"""The Textual workbench."""
