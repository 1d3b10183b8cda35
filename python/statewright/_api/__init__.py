"""Fourth layer: the public functions. Each validates its input (``_base``), calls
``_compute`` (or the core directly) and wraps the result (``_results``)."""
