"""The document to and from a project file's content (profilebench.editor.project_file), no Qt."""

import pytest

from profilebench.assess.conditions import Conditions
from profilebench.editor import commands
from profilebench.editor.document import Document
from profilebench.editor.project_file import document_of, project_of
from profilebench.editor.underlay import Underlay
from profilebench.errors import ProjectFileError
from profilebench.geometry.profile import Profile
from profilebench.io import load_project, save_project

BOX = Profile.from_points(
    [(0.0, 0.2), (4.0, 0.2), (4.0, 1.7), (0.0, 1.7)], radii=[0, 0, 0.1, 0.2], name="box"
)
PX = ((120.0, 410.0), (780.0, 405.0))
M = ((0.6, 0.33), (3.2, 0.33))


def _sized(path):
    """An image reader's stand-in: every image is 900 x 450 px."""
    return Underlay.initial(path, 900, 450)


def _document(image):
    doc = Document(BOX, Conditions(speed=35.0))
    doc.set_state(commands.pin_baseline(doc.state).after)
    u = Underlay.initial(image, 900, 450).placed(PX, M).with_opacity(0.6)
    doc.set_state(commands.set_underlay(doc.state, u, "Load underlay").after)
    return doc


def test_a_saved_document_opens_as_it_was(tmp_path):
    (tmp_path / "img").mkdir()
    image = tmp_path / "img" / "side.png"
    image.write_bytes(b"not read here")
    doc = _document(image)
    path = tmp_path / "p.json"
    project = project_of(doc, path)
    assert project.underlay.path == "img/side.png"  # relative to the project's folder
    save_project(project, path)
    again = document_of(load_project(path), path, _sized)
    assert again.profile == doc.profile and again.conditions == doc.conditions
    assert again.baseline == doc.baseline and again.path == path
    assert again.underlay == doc.underlay


def test_without_a_project_path_or_an_image_reader_the_underlay_is_left_out(tmp_path):
    image = tmp_path / "side.png"
    doc = _document(image)
    assert project_of(doc).underlay is None  # a recovery copy
    path = tmp_path / "p.json"
    save_project(project_of(doc, path), path)
    opened = document_of(load_project(path), path)
    assert opened.underlay is None and opened.baseline == doc.baseline
    untitled = document_of(load_project(path))
    assert untitled.path is None and untitled.profile == doc.profile


def test_an_underlay_outside_the_project_folder_is_refused(tmp_path):
    (tmp_path / "project").mkdir()
    doc = _document(tmp_path / "side.png")
    with pytest.raises(ProjectFileError, match="not inside the project folder"):
        project_of(doc, tmp_path / "project" / "p.json")


def test_a_projects_notes_survive_opening_and_saving_in_the_editor(tmp_path):
    # the editor does not edit the notes, but saving from it must not lose them (they were
    # written empty before)
    import dataclasses

    path = tmp_path / "p.json"
    project = project_of(Document(BOX, Conditions(speed=35.0)))
    save_project(dataclasses.replace(project, notes="tunnel entry 14: front radii as drawn"), path)
    doc = document_of(load_project(path), path)
    doc.set_state(commands.set_radius(doc.state, 2, 0.15).after)  # an edit, then save
    save_project(project_of(doc, path), path)
    assert load_project(path).notes == "tunnel entry 14: front radii as drawn"
