"""Second layer: calls of the Rust core on already validated arrays, returning arrays and
plain tuples. Imports ``_core`` and ``_base`` only."""
