"""The editor's document to and from a project file's content (:class:`profilebench.io.Project`).

One place for the conversion that opening, saving and the recovery copies use. A project file
stores the underlay by its image path relative to the project's folder and by its two point
pairs; the document holds the image's absolute path and size, which only an image reader can
give, so opening takes a function that reads the image (the window's, with Qt).
"""

from __future__ import annotations

from profilebench.editor.document import Document

__all__ = ["project_of", "document_of"]


def project_of(document: Document, path=None):
    """The :class:`~profilebench.io.Project` to write for ``document`` at ``path``.

    With ``path`` None (a recovery copy, written beside no project) the underlay is left out:
    its image path is stored relative to the project file's folder. Raises ProjectFileError
    when the underlay's image is not inside the folder of ``path``.
    """
    from profilebench.io import Underlay as FileUnderlay
    from profilebench.io import underlay_relative_path

    file_underlay = None
    u = document.underlay
    if u is not None and path is not None:
        file_underlay = FileUnderlay(
            underlay_relative_path(u.path, path), u.points_px, u.points_m, u.opacity
        )
    return document.to_project(underlay=file_underlay)


def document_of(project, path=None, read_image=None) -> Document:
    """A :class:`Document` of ``project`` read from ``path`` (None: untitled).

    ``read_image(image_path) -> editor.underlay.Underlay`` gives the underlay of an image at its
    initial placement (the image's size in pixels); the project's point pairs and opacity are
    then applied. Without ``read_image`` (or ``path``) the project's underlay is left out.
    Raises ProjectFileError for an image path that leaves the project's folder, and whatever
    ``read_image`` raises for an image it cannot read.
    """
    from profilebench.io import resolve_underlay

    underlay = None
    u = project.underlay
    if u is not None and read_image is not None and path is not None:
        underlay = read_image(resolve_underlay(project, path))
        underlay = underlay.placed(u.points_px, u.points_m).with_opacity(u.opacity)
    return Document.from_project(project, path=path, underlay=underlay)
