"""The Textual terminal UI. Imported only when the UI starts."""
