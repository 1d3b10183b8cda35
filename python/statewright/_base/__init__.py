"""Bottom layer: validation and conversion of user input, exact helpers, scaling and display.

Nothing here imports from the layers above (``_compute``, ``_results``, ``_api``).
"""
