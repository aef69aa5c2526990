"""wakemeter: measure ship wakes on georeferenced imagery.

Layers (dependencies point one way): ``app``/``cli`` -> ``evidence`` -> ``detect`` ->
``scene``, ``physics``.  Only ``wakemeter.app`` imports Qt.
"""

from __future__ import annotations

__version__ = "0.1.0"
