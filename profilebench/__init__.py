"""profilebench: screening aerodynamics of 2D vehicle side profiles.

Screening estimates only: confirm with wind-tunnel tests or validated CFD, under local vehicle
codes and licensed engineering practice.
"""

__version__ = "0.1.0"
