"""Third layer: the result objects (:class:`Realization`, :class:`Staircase`,
:class:`Decomposition`). Their convenience methods call ``_compute``, never ``_api``."""
