"""One module per CLI command. Each defines ``register(subparsers)`` and keeps its heavy
imports inside the function that runs the command, so ``robtui --help`` stays fast.

``register`` adds a subparser and sets ``func`` on it: ``func(args) -> int`` (exit code).
"""
