"""CLI subcommands: one module each, registered in ``fieldkit.cli.COMMAND_MODULES``."""
