"""One module per command, each with ``run(args) -> int``; imported lazily by the CLI."""
