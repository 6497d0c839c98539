"""Project files of format version 2: named variants of the profile and the baseline variant.

The reference for the checks is the project format documented in profilebench.io.project (its
"Variants" and "Versions" paragraphs) and the JSON standard (RFC 8259) as implemented by Python's
json module.
"""

import json

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from profilebench.assess.conditions import Conditions
from profilebench.errors import InputError, ProjectFileError
from profilebench.geometry.profile import Node, Profile
from profilebench.io.project import variant_key
from profilebench.io import (
    MAX_VARIANTS,
    Project,
    Variant,
    load_project,
    project_to_dict,
    sample_paths,
    save_project,
)


def _box(name="box", front_radius=0.05, top=0.6):
    return Profile(
        (
            Node(0.0, 0.1, front_radius, label="front lower"),
            Node(2.0, 0.1),
            Node(2.0, top),
            Node(0.0, top, front_radius, label="front upper"),
        ),
        name=name,
    )


def _variants():
    return (
        Variant("front A", _box("A", 0.05)),
        Variant("front B", _box("B", 0.12), note="larger nose radii"),
        Variant("front C tall", _box("C", 0.08, top=0.7)),
    )


def _project(**kw):
    base = dict(
        profile=_box(),
        conditions=Conditions(speed=25.0, width=1.0),
        variants=_variants(),
        baseline_variant="front B",
    )
    base.update(kw)
    return Project(**base)


def _write(path, data):
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


def _refused(tmp_path, data):
    with pytest.raises(ProjectFileError) as info:
        load_project(_write(tmp_path / "bad.json", data))
    return info.value


# --------------------------------------------------------------------------- round trips
def test_variants_round_trip(tmp_path):
    project = _project(notes="five front ends for the tunnel")
    path = save_project(project, tmp_path / "v.json")
    back = load_project(path)
    assert back == project
    assert [v.name for v in back.variants] == ["front A", "front B", "front C tall"]
    assert back.variants[1].note == "larger nose radii"
    assert back.baseline_variant == "front B"
    data = json.loads(path.read_text())
    assert data["version"] == 2
    assert [v["name"] for v in data["variants"]] == ["front A", "front B", "front C tall"]


def test_no_baseline_variant_round_trips_as_null(tmp_path):
    project = _project(baseline_variant=None)
    path = save_project(project, tmp_path / "v.json")
    assert json.loads(path.read_text())["baseline_variant"] is None
    assert load_project(path) == project


def test_a_project_without_variants_saves_as_version_2(tmp_path):
    project = _project(variants=(), baseline_variant=None)
    path = save_project(project, tmp_path / "v.json")
    data = json.loads(path.read_text())
    assert data["version"] == 2 and data["variants"] == []
    assert load_project(path) == project


def test_variant_lookup_ignores_case_and_spaces():
    project = _project()
    assert project.variant(" FRONT b ").name == "front B"
    with pytest.raises(InputError, match="no variant named 'front Z'.*'front A'"):
        project.variant("front Z")


# --------------------------------------------------------------------------- version 1
def _v1_dict():
    d = project_to_dict(_project(variants=(), baseline_variant=None))
    d["version"] = 1
    del d["variants"], d["baseline_variant"]
    return d


def test_a_version_1_file_loads_unchanged(tmp_path):
    project = load_project(_write(tmp_path / "v1.json", _v1_dict()))
    assert project == _project(variants=(), baseline_variant=None)
    assert project.variants == ()


@pytest.mark.parametrize("path", sample_paths(), ids=[p.name for p in sample_paths()])
def test_the_samples_are_version_1_files_and_load(path):
    assert json.loads(path.read_text(encoding="utf-8"))["version"] == 1
    assert load_project(path).variants == ()


@pytest.mark.parametrize("key, value", [("variants", []), ("baseline_variant", None)])
def test_a_version_1_file_with_version_2_keys_is_refused(tmp_path, key, value):
    d = _v1_dict()
    d[key] = value
    err = _refused(tmp_path, d)
    assert err.path == key
    assert 'set "version": 2' in str(err)


# --------------------------------------------------------------------------- refusals
def _v2(edit):
    d = project_to_dict(_project())
    edit(d)
    return d


def test_duplicate_names_are_refused_naming_both(tmp_path):
    err = _refused(tmp_path, _v2(lambda d: d["variants"][2].update(name=" Front a")))
    assert err.path == "variants[2].name"
    assert "' Front a'" in str(err) and "variants[0]" in str(err) and "rename" in str(err)


def test_an_unknown_baseline_name_is_refused_listing_the_names(tmp_path):
    err = _refused(tmp_path, _v2(lambda d: d.update(baseline_variant="front D")))
    assert err.path == "baseline_variant"
    for words in ("'front D'", "'front A'", "'front B'", "'front C tall'", "give one of"):
        assert words in str(err)


def test_a_bad_node_inside_a_variant_names_the_variant_and_the_field(tmp_path):
    err = _refused(tmp_path, _v2(lambda d: d["variants"][1]["profile"]["nodes"][2].update(x="a")))
    assert err.path == "variants[1].profile.nodes[2].x"
    assert "expected a number" in str(err) and "(in variant 'front B')" in str(err)


def test_a_variant_profile_of_two_nodes_is_refused(tmp_path):
    def two_nodes(d):
        nodes = d["variants"][0]["profile"]["nodes"]
        del nodes[2:]

    err = _refused(tmp_path, _v2(two_nodes))
    assert err.path == "variants[0].profile.nodes"
    assert "at least 3" in str(err) and "'front A'" in str(err)


@pytest.mark.parametrize(
    "edit, path, words",
    [
        (lambda d: d["variants"][0].update(name=""), "variants[0].name", "empty"),
        (lambda d: d["variants"][0].update(name="   "), "variants[0].name", "empty"),
        (lambda d: d["variants"][0].update(name=3), "variants[0].name", "expected a string"),
        (lambda d: d["variants"][0].update(name="a\x1bb"), "variants[0].name", "control"),
        (lambda d: d["variants"][0].update(name="n" * 81), "variants[0].name", "shorter name"),
        (lambda d: d["variants"][1].pop("name"), "variants[1].name", "missing"),
        (lambda d: d["variants"][1].pop("profile"), "variants[1].profile", "missing"),
        (lambda d: d["variants"][1].update(colour="red"), "variants[1].colour", "unknown field"),
        (lambda d: d["variants"][1].update(note=5), "variants[1].note", "expected a string"),
        (lambda d: d["variants"][1].update(profile=[]), "variants[1].profile", "expected a"),
        (lambda d: d.update(variants={"a": 1}), "variants", "expected a list"),
        (lambda d: d["variants"].__setitem__(0, "front A"), "variants[0]", "expected a variant"),
        (lambda d: d.update(baseline_variant=7), "baseline_variant", "expected a string"),
    ],
    ids=[
        "empty name",
        "blank name",
        "number name",
        "control character",
        "long name",
        "no name",
        "no profile",
        "unknown key",
        "note a number",
        "profile a list",
        "variants an object",
        "variant a string",
        "baseline a number",
    ],
)
def test_bad_variant_fields_are_refused_by_path(tmp_path, edit, path, words):
    err = _refused(tmp_path, _v2(edit))
    assert err.path == path, str(err)
    assert words in str(err)


def test_too_many_variants_are_refused(tmp_path):
    one = project_to_dict(_project())["variants"][0]
    many = [dict(one, name=f"v{i}") for i in range(MAX_VARIANTS + 1)]
    err = _refused(tmp_path, _v2(lambda d: d.update(variants=many, baseline_variant=None)))
    assert err.path == "variants" and f"limit of {MAX_VARIANTS}" in str(err)


def test_a_refused_file_is_left_as_it_was(tmp_path):
    data = _v2(lambda d: d.update(baseline_variant="nobody"))
    path = _write(tmp_path / "bad.json", data)
    before = path.read_bytes()
    with pytest.raises(ProjectFileError):
        load_project(path)
    assert path.read_bytes() == before


# --------------------------------------------------------------------------- the classes
@pytest.mark.parametrize(
    "make, words",
    [
        (lambda: Variant("", _box()), "empty"),
        (lambda: Variant("a", "not a profile"), "must be a Profile"),
        (lambda: Variant("a", _box(), note=None), "note must be a string"),
        (
            lambda: _project(variants=(Variant("x", _box()), Variant("X ", _box()))),
            "names must differ",
        ),
        (lambda: _project(baseline_variant="front Q"), "is not the name of a variant"),
        (lambda: _project(variants=(), baseline_variant="a"), "has no variants"),
        (lambda: _project(variants=(_box(),)), "must be a Variant"),
    ],
    ids=[
        "empty name",
        "profile",
        "note",
        "duplicate",
        "unknown baseline",
        "baseline without variants",
        "not a Variant",
    ],
)
def test_the_classes_refuse_what_the_file_refuses(make, words):
    with pytest.raises(InputError, match=words):
        make()


# --------------------------------------------------------------------------- random round trips
names = st.text(min_size=1, max_size=30).filter(
    lambda s: s.strip() and not any(ord(c) < 32 or 0x7F <= ord(c) <= 0x9F for c in s)
)


@st.composite
def variant_sets(draw):
    chosen = draw(st.lists(names, max_size=6, unique_by=variant_key))
    out = []
    for name in chosen:
        top = draw(st.floats(min_value=0.3, max_value=2.0))
        radius = draw(st.floats(min_value=0.0, max_value=0.1))
        out.append(Variant(name, _box(name, radius, top), draw(st.text(max_size=20))))
    baseline = draw(st.sampled_from([None] + [v.name for v in out]))
    return tuple(out), baseline


@settings(
    max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(chosen=variant_sets())
def test_random_variant_sets_round_trip(tmp_path, chosen):
    # exact float round trip: json writes repr(float), the shortest string that reads back to
    # the same double (Python float repr, IEEE 754 binary64)
    variants, baseline = chosen
    project = _project(variants=variants, baseline_variant=baseline)
    assert load_project(save_project(project, tmp_path / "r.json")) == project
