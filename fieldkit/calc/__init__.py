"""Pure, units-aware computation shared by every screen and CLI command.

Nothing here imports Textual, touches files or reads the clock.
"""
