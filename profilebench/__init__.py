"""profilebench: screening aerodynamics of 2D vehicle side profiles.

Public API (also used by the command line and the desktop editor)::

    from profilebench import Profile, Node, Conditions, analyze, compare
    from profilebench import load_project, save_project, smallest_attached_radius

Screening estimates only: confirm with wind-tunnel tests or validated CFD, under local vehicle
codes and licensed engineering practice.
"""

import os as _os

# profilebench solves many small dense systems (a few hundred unknowns) per edit, often from a
# worker thread beside the GUI thread. A multi-threaded BLAS gains nothing at that size and, when
# the machine is busy, its spinning threads slow each solve by an order of magnitude (measured:
# 0.05 s against 0.66 s for one analysis with another process loading the second core). Ask for one
# thread unless the user chose otherwise. This only takes effect if numpy is not imported yet.
for _var in ("OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS", "OMP_NUM_THREADS"):
    _os.environ.setdefault(_var, "1")

__version__ = "0.1.0"

CAUTION = (
    "Screening estimate: confirm by wind-tunnel test or validated CFD, under local vehicle codes "
    "and licensed engineering practice."
)

_EXPORTS = {
    "Profile": "profilebench.geometry.profile",
    "Node": "profilebench.geometry.profile",
    "Conditions": "profilebench.assess.conditions",
    "analyze": "profilebench.assess.analysis",
    "compare": "profilebench.assess.compare",
    "smallest_attached_radius": "profilebench.assess.radius_search",
    "load_project": "profilebench.io.project",
    "save_project": "profilebench.io.project",
    "Project": "profilebench.io.project",
    "solve_inviscid": "profilebench.flow.panel",
    "march_boundary_layer": "profilebench.flow.boundary_layer",
}

__all__ = ["CAUTION", "__version__", *_EXPORTS]


def __getattr__(name):
    # imported on first use so that `import profilebench` stays light (PEP 562)
    if name in _EXPORTS:
        import importlib

        value = getattr(importlib.import_module(_EXPORTS[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'profilebench' has no attribute {name!r}")
