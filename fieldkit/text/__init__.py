"""Text for people: width-aware line builders and the escaping of user text per target."""
