"""Test configuration shared by the whole suite.

GUI tests run headless: Qt's offscreen platform is set before anything imports Qt.
"""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")
# as profilebench/__init__.py does: one BLAS thread for the small panel systems
for _var in ("OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS", "OMP_NUM_THREADS"):
    os.environ.setdefault(_var, "1")
