"""The only code that changes a job: one function per change, each through the store."""
