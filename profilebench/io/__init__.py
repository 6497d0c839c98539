"""Reading and writing: project files, digitised point files, and the sample profiles.

Project files (:mod:`profilebench.io.project`) are profilebench's own versioned JSON format in SI
units (m, m/s); from version 2 it also keeps named variants of the profile (version 1 files
load unchanged). Saving is atomic (:mod:`profilebench.io.atomic`): a temporary file in the same
folder is flushed, fsync'ed and renamed over the old one, so a failed save leaves the previous
file intact. Loading checks every field and reports the first bad one by its JSON path.

Point files (:mod:`profilebench.io.points`) are CSV-like lists of digitised outline points in mm
or m; :func:`profile_from_points` turns them into an editable profile.

Node order of the sample profiles: every sample runs **counter-clockwise** in the (x rearward,
y up) frame, i.e. with positive signed (shoelace) area: it starts at the front lower corner
("front bumper lower"), runs rearward along the underside, up the tail, forward along the roof,
down the windscreen and bonnet, and down the front face back to the start. Profiles read from
elsewhere may run either way (see :class:`profilebench.geometry.profile.Profile`).
"""

from profilebench.io.atomic import atomic_write_text
from profilebench.io.points import (
    MM_THRESHOLD,
    PointImport,
    import_points_csv,
    profile_from_points,
    read_points_csv,
    write_points_csv,
)
from profilebench.io.project import (
    FORMAT_NAME,
    FORMAT_VERSION,
    MAX_PROJECT_BYTES,
    MAX_VARIANTS,
    UNITS,
    Project,
    Underlay,
    Variant,
    load_project,
    profile_from_dict,
    profile_to_dict,
    project_from_dict,
    project_to_dict,
    resolve_underlay,
    save_project,
    underlay_relative_path,
)
from profilebench.io.samples import DEFAULT_SAMPLE, default_sample_path, sample_paths

__all__ = [
    "atomic_write_text",
    "MM_THRESHOLD",
    "PointImport",
    "import_points_csv",
    "profile_from_points",
    "read_points_csv",
    "write_points_csv",
    "FORMAT_NAME",
    "FORMAT_VERSION",
    "MAX_PROJECT_BYTES",
    "MAX_VARIANTS",
    "UNITS",
    "Project",
    "Underlay",
    "Variant",
    "load_project",
    "profile_from_dict",
    "profile_to_dict",
    "project_from_dict",
    "project_to_dict",
    "resolve_underlay",
    "save_project",
    "underlay_relative_path",
    "DEFAULT_SAMPLE",
    "default_sample_path",
    "sample_paths",
]
