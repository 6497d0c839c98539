"""Variants of the sample projects that tests need (importable: tests/ is on the path)."""

# The courier-van sample with its bonnet leading edge (node 7) sharpened from 120 mm to 30 mm:
# the solver then finds a corner bubble there (separation, reattachment on the bonnet) whose drag
# correction needs the smallest-attached-radius search (about 43 mm at 200 panels). Tests of
# the search cache and the editor's drag-time reuse of a search use it.
BUBBLE_VAN_NODE = 7
BUBBLE_VAN_RADIUS = 0.03


def bubble_van_project():
    """The van sample's Project with the sharpened bonnet leading edge (see above)."""
    import dataclasses

    from profilebench.io import load_project, sample_paths

    path = next(p for p in sample_paths() if p.stem == "kestrel_courier_van")
    project = load_project(path)
    profile = project.profile.with_radius(BUBBLE_VAN_NODE, BUBBLE_VAN_RADIUS)
    return dataclasses.replace(project, profile=profile)
