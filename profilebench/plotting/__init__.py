"""Pure matplotlib drawing shared by the editor, the command line and review pages (no Qt)."""

from profilebench.plotting.charts import draw_boundary_layer, draw_cp
from profilebench.plotting.profile_view import draw_profile
from profilebench.plotting.review import (
    IMAGE_FORMATS,
    image_format,
    new_figure,
    review_figure,
    save_figure,
)
from profilebench.plotting.style import CAUTION, EVENT_STYLES
from profilebench.plotting.summary import corner_rows, summary_rows

__all__ = [
    "draw_profile",
    "draw_cp",
    "draw_boundary_layer",
    "review_figure",
    "save_figure",
    "new_figure",
    "image_format",
    "IMAGE_FORMATS",
    "summary_rows",
    "corner_rows",
    "EVENT_STYLES",
    "CAUTION",
]
