"""Coldseam: thermal-bridge evaluation of 2D building-envelope sections.

The pipeline, one package per stage (imports go one way):
``schema -> geometry -> meshing -> fem -> thermal -> api``.
"""

__version__ = "0.1.0"

#: Changes whenever a change to the engine can change a number in a result;
#: part of every evaluation id, so stored results never outlive their engine.
ENGINE_VERSION = "coldseam-engine-4"

#: The engine the service and ``coldseam evaluate`` run unless ``COLDSEAM_ENGINE`` names another.
DEFAULT_ENGINE = "coldseam.thermal.evaluate:evaluate"

CAUTION = (
    "Figures from Coldseam are engineering estimates. They must be checked by a competent "
    "person before they are relied on; local building codes and licensed professional "
    "practice govern."
)
