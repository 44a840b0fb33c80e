"""Per-job logs: the records (models), the crash-safe JSON store, and the reports."""
