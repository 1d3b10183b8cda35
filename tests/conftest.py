"""Test configuration: hypothesis keeps no example database on disk."""

from hypothesis import settings

settings.register_profile("statewright", database=None)
settings.load_profile("statewright")
