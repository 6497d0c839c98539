"""Corners named by their place on the outline (profilebench.geometry.places): a convention of
this project (no source), checked on the samples' own corners with their labels removed."""

import pytest

from profilebench import Profile, analyze
from profilebench.geometry import rounded_box
from profilebench.geometry.places import place_names
from profilebench.geometry.profile import Node
from profilebench.io import load_project, sample_paths


def _unlabelled(profile):
    return Profile(
        tuple(Node(n.x, n.y, n.radius, n.smooth) for n in profile.nodes), name=profile.name
    )


@pytest.fixture(scope="module")
def van():
    return load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))


def test_the_van_corners_get_names_by_place(van):
    names = place_names(_unlabelled(van.profile))
    assert names[5] == "windscreen base"  # the concave corner at the screen's foot
    assert names[0] == "front lower corner"
    assert names[4] == "roof front edge" and names[3] == "roof rear edge"
    assert all(not van.profile.nodes[i].smooth for i in names)


def test_names_are_unique_and_numbered_front_to_back(van):
    names = place_names(_unlabelled(van.profile))
    assert len(set(names.values())) == len(names)
    # the van's two rear lower corners, in x order
    assert names[1] == "rear lower corner 1" and names[2] == "rear lower corner 2"


def test_an_unlabelled_corner_is_reported_by_its_place_not_its_number(van):
    a = analyze(_unlabelled(van.profile), van.conditions)
    labels = [c.label for c in a.corners]
    assert not any(lab.startswith("node ") for lab in labels)
    assert "windscreen base" in labels


def test_a_label_the_user_gave_wins(van):
    a = analyze(van.profile, van.conditions)
    assert "bonnet leading edge" in [c.label for c in a.corners]


def test_a_box_s_four_corners():
    names = place_names(rounded_box(4.0, 1.8, 0.1, clearance=0.2))
    assert sorted(names.values()) == [
        "front lower corner",
        "rear lower corner",
        "roof front edge",
        "roof rear edge",
    ]
