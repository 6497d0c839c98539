"""Project files: profilebench's own versioned JSON format.

A project file holds the edited profile, the flow conditions, an optional baseline profile to
compare against, an optional underlay image (a photo or drawing traced over), free notes and
(from version 2) an ordered set of named variants of the profile::

    {"format": "profilebench-project", "version": 2, "units": "SI (m, m/s)",
     "profile": {"name": str, "trailing_edge": int | null,
                 "nodes": [{"x": m, "y": m, "radius": m, "smooth": bool, "label": str}, ...]},
     "conditions": {...Conditions.to_dict()...},
     "baseline": null | <profile object>,
     "underlay": null | {"path": "relative/path.png", "points_px": [[u, v], [u, v]],
                         "points_m": [[x, y], [x, y]], "opacity": 0..1},
     "notes": "",
     "variants": [{"name": str, "profile": <profile object>, "note": str}, ...],
     "baseline_variant": null | str}

Lengths are metres and speeds m/s throughout the file. Required keys: ``format``, ``version``,
``profile`` (with ``nodes``; each node with ``x`` and ``y``) and ``conditions``. Optional keys
and their defaults: ``units`` (must read "SI (m, m/s)" when present), ``baseline`` (null),
``underlay`` (null), ``notes`` (""), ``variants`` ([]), ``baseline_variant`` (null), profile
``name`` ("profile") and ``trailing_edge`` (null), node ``radius`` (0), ``smooth`` (false) and
``label`` (""), variant ``note`` (""). Unknown keys are refused (they are usually a misspelt field
that would otherwise be ignored).

Variants (version 2). ``variants`` is an ordered list of at most :data:`MAX_VARIANTS` named
profiles kept beside the one being edited (``profile``), for instance the front ends to choose
between for a tunnel test. Each has a ``name`` (non-empty, not only spaces, at most
:data:`MAX_NAME_CHARS` characters, unique in the file ignoring case and surrounding spaces, so
that "Front A" and "front a " are not two variants), a ``profile`` and an optional ``note``.
``baseline_variant`` names the variant the others are ranked against; null means the first one.
The variants have no conditions of their own: they are all analysed at the project's
``conditions``, so that a ranking compares shapes only. With a ``width`` in the conditions each
variant's reference area is that width times its own frontal height (a taller variant has a
larger area); a fixed ``frontal_area`` gives every variant the same area, so that CdA and force
then rank exactly as Cd (see :mod:`profilebench.studies.variants`).

Versions. Saving always writes version 2. A version 1 file (no ``variants`` or
``baseline_variant`` keys; every other key as above) loads unchanged, with no variants; those two
keys in a version 1 file are refused (set ``"version": 2``). The sample projects are version 1
files and stay so on disk.

Reading uses the :mod:`json` module only (data, never code). Every field is checked and the first
bad one is reported with its JSON path, e.g. ``profile.nodes[3].radius``. Limits keep a wrong or
hostile file from costing time or memory: at most :data:`MAX_PROJECT_BYTES` bytes, at most
:data:`MAX_NODES` nodes per profile (counted while the JSON is parsed, before any node is built),
whole numbers of at most :data:`MAX_INTEGER_DIGITS` digits, and text without lone surrogates
(which no file or terminal can encode). Saving is atomic (see :mod:`profilebench.io.atomic`).
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from pathlib import Path, PurePosixPath, PureWindowsPath

from profilebench.errors import InputError, ProfileBenchError, ProjectFileError, excerpt
from profilebench.geometry.profile import Node, Profile
from profilebench.io.atomic import atomic_write_text, read_input_bytes

__all__ = [
    "FORMAT_NAME",
    "FORMAT_VERSION",
    "UNITS",
    "MAX_PROJECT_BYTES",
    "MAX_NODES",
    "MAX_INTEGER_DIGITS",
    "MAX_UNDERLAY_BYTES",
    "MAX_VARIANTS",
    "MAX_NAME_CHARS",
    "READ_VERSIONS",
    "Underlay",
    "Variant",
    "variant_index",
    "variant_key",
    "check_variants",
    "Project",
    "profile_to_dict",
    "profile_from_dict",
    "project_to_dict",
    "project_from_dict",
    "save_project",
    "load_project",
    "resolve_underlay",
    "underlay_relative_path",
]

FORMAT_NAME = "profilebench-project"
FORMAT_VERSION = 2
#: the format versions this profilebench reads (1: no variants; 2: variants)
READ_VERSIONS = (1, 2)
UNITS = "SI (m, m/s)"
#: Largest project file read (bytes). A real project is a few kB; the limit stops a wrong file
#: (an image, a data dump) from being read into memory.
MAX_PROJECT_BYTES = 20 * 1024 * 1024
#: Most nodes in one profile. A drawn profile has tens of nodes and a fitted outline a few
#: hundred; this is far above both and keeps a solve of the outline quick (common practice, no
#: source).
MAX_NODES = 5000
#: Most variants in one project file. Choosing between variants is done among a handful (five
#: front ends for one tunnel slot); the limit keeps a ranking of them a matter of minutes.
MAX_VARIANTS = 50
#: Longest variant name (characters): a name is shown in a table cell.
MAX_NAME_CHARS = 80
#: Most JSON objects in a project file: the profile, the baseline and MAX_VARIANTS variants of
#: MAX_NODES nodes each, and a few more objects.
MAX_OBJECTS = (2 + MAX_VARIANTS) * (MAX_NODES + 2) + 100
#: Longest whole number (digits) in a project file: no field needs more (a node index, a panel
#: count), and Python refuses to convert ones over 4300 digits.
MAX_INTEGER_DIGITS = 30
#: Largest underlay image read (bytes).
MAX_UNDERLAY_BYTES = 200 * 1024 * 1024


def _conditions_class():
    # Imported late: assess sits beside io in the layer diagram and io only needs the class.
    from profilebench.assess.conditions import Conditions

    return Conditions


# --------------------------------------------------------------------------------------------
# Data classes
# --------------------------------------------------------------------------------------------
def _pair(value, what: str) -> tuple[float, float]:
    try:
        u, v = value
        u, v = float(u), float(v)
    except (TypeError, ValueError) as exc:
        raise InputError(f"{what} must be a pair of numbers, got {value!r}") from exc
    if not (math.isfinite(u) and math.isfinite(v)):
        raise InputError(f"{what} must be finite, got {value!r}")
    return (u, v)


@dataclass(frozen=True)
class Underlay:
    """A background image traced over in the editor, calibrated by two reference points.

    Parameters
    ----------
    path : str
        Image path relative to the project file's folder, with "/" separators.
    points_px : ((u, v), (u, v))
        Two reference points in image pixels.
    points_m : ((x, y), (x, y))
        The same two points in profile coordinates (m).
    opacity : float
        Drawing opacity, 0 (invisible) to 1 (opaque).
    """

    path: str
    points_px: tuple[tuple[float, float], tuple[float, float]]
    points_m: tuple[tuple[float, float], tuple[float, float]]
    opacity: float = 0.5

    def __post_init__(self):
        if not isinstance(self.path, str) or not self.path.strip():
            raise InputError(f"underlay path must be a non-empty string, got {self.path!r}")
        for name in ("points_px", "points_m"):
            value = getattr(self, name)
            try:
                a, b = value
            except (TypeError, ValueError) as exc:
                raise InputError(
                    f"underlay {name} must be two (x, y) points, got {value!r}"
                ) from exc
            pa, pb = _pair(a, f"underlay {name}[0]"), _pair(b, f"underlay {name}[1]")
            if pa == pb:
                raise InputError(
                    f"underlay {name} has the same point twice {pa}; pick two distinct "
                    "reference points to calibrate the image"
                )
            object.__setattr__(self, name, (pa, pb))
        op = self.opacity
        if isinstance(op, bool) or not isinstance(op, (int, float)) or not 0.0 <= op <= 1.0:
            raise InputError(f"underlay opacity must be a number from 0 to 1, got {op!r}")
        object.__setattr__(self, "opacity", float(op))


def variant_key(name: str) -> str:
    """The form of a variant name that must be unique in a project: without surrounding spaces,
    case folded ("Front A" and "front a " are the same variant)."""
    return name.strip().casefold()


def check_variant_name(name, what: str = "variant name") -> str:
    """``name`` if it can name a variant, else an InputError saying why and how to fix it."""
    if not isinstance(name, str):
        raise InputError(f"{what} must be a string, got {type(name).__name__}")
    if not name.strip():
        raise InputError(f"{what} is empty; give the variant a name (such as 'front A')")
    if len(name) > MAX_NAME_CHARS:
        raise InputError(
            f"{what} has {len(name)} characters, over the limit of {MAX_NAME_CHARS}; "
            "give a shorter name"
        )
    if any(ord(c) < 32 or 0x7F <= ord(c) <= 0x9F or 0xD800 <= ord(c) <= 0xDFFF for c in name):
        raise InputError(
            f"{what} {excerpt(name)} holds a control character or a lone surrogate; "
            "retype the name with printable characters"
        )
    return name


@dataclass(frozen=True)
class Variant:
    """One named variant of the profile, kept in the project beside the profile being edited.

    Parameters
    ----------
    name : str
        Non-empty, at most :data:`MAX_NAME_CHARS` characters, unique in its project (see
        :func:`variant_key`).
    profile : Profile
        The variant's outline (m).
    note : str
        Free text (what was changed, why).
    """

    name: str
    profile: Profile
    note: str = ""

    def __post_init__(self):
        check_variant_name(self.name)
        if not isinstance(self.profile, Profile):
            raise InputError(
                f"variant {excerpt(self.name)}: profile must be a Profile, got "
                f"{type(self.profile).__name__}"
            )
        if not isinstance(self.note, str):
            raise InputError(
                f"variant {excerpt(self.name)}: note must be a string, got "
                f"{type(self.note).__name__}"
            )


def check_variants(variants, baseline_variant=None) -> tuple:
    """``variants`` as a tuple of :class:`Variant`, checked: at most :data:`MAX_VARIANTS`,
    unique names, and ``baseline_variant`` (a name, or None) one of them.

    Raises
    ------
    InputError
        Naming the variant at fault and how to fix it.
    """
    try:
        variants = tuple(variants)
    except TypeError:
        raise InputError(
            f"variants must be a sequence of Variant, got {type(variants).__name__}"
        ) from None
    if len(variants) > MAX_VARIANTS:
        raise InputError(
            f"{len(variants)} variants is over the limit of {MAX_VARIANTS}; delete the ones "
            "no longer considered"
        )
    seen = {}
    for i, v in enumerate(variants):
        if not isinstance(v, Variant):
            raise InputError(f"variants[{i}] must be a Variant, got {type(v).__name__}")
        key = variant_key(v.name)
        if key in seen:
            raise InputError(
                f"variants[{i}] is named {excerpt(v.name)}, the name of variants[{seen[key]}] "
                f"({excerpt(variants[seen[key]].name)}); variant names must differ (ignoring "
                "case and surrounding spaces): rename one of them"
            )
        seen[key] = i
    if baseline_variant is not None:
        check_variant_name(baseline_variant, "baseline_variant")
        if not any(v.name == baseline_variant for v in variants):
            names = ", ".join(excerpt(v.name) for v in variants) or "none"
            raise InputError(
                f"baseline_variant {excerpt(baseline_variant)} is not the name of a variant "
                f"(the variants are: {names}); give one of those names, or none to rank "
                "against the first variant"
            )
    return variants


@dataclass(frozen=True)
class Project:
    """Everything a project file holds.

    Parameters
    ----------
    profile : Profile
        The profile being edited (m).
    conditions : Conditions
        Flow conditions (:class:`profilebench.assess.conditions.Conditions`).
    baseline : Profile or None
        A reference profile to compare against.
    underlay : Underlay or None
        A background image to trace over.
    notes : str
        Free text.
    variants : tuple of Variant
        Named variants of the profile, in the user's order (see the module docstring); they are
        analysed at ``conditions``.
    baseline_variant : str or None
        The name of the variant the others are ranked against; None: the first variant.
    """

    profile: Profile
    conditions: object
    baseline: Profile | None = None
    underlay: Underlay | None = None
    notes: str = ""
    variants: tuple = ()
    baseline_variant: str | None = None

    def __post_init__(self):
        if not isinstance(self.profile, Profile):
            raise InputError(
                f"project profile must be a Profile, got {type(self.profile).__name__}"
            )
        if not isinstance(self.conditions, _conditions_class()):
            raise InputError(
                f"project conditions must be a Conditions, got {type(self.conditions).__name__}"
            )
        if self.baseline is not None and not isinstance(self.baseline, Profile):
            raise InputError(
                f"project baseline must be a Profile or None, got {type(self.baseline).__name__}"
            )
        if self.underlay is not None and not isinstance(self.underlay, Underlay):
            raise InputError(
                f"project underlay must be an Underlay or None, got {type(self.underlay).__name__}"
            )
        if not isinstance(self.notes, str):
            raise InputError(f"project notes must be a string, got {type(self.notes).__name__}")
        if self.baseline_variant is not None and not self.variants:
            raise InputError(
                f"baseline_variant {excerpt(str(self.baseline_variant))} is given but the "
                "project has no variants; store a variant first or give no baseline_variant"
            )
        object.__setattr__(self, "variants", check_variants(self.variants, self.baseline_variant))

    def variant(self, name: str) -> Variant:
        """The variant called ``name`` (compared as :func:`variant_key` does)."""
        return self.variants[variant_index(self.variants, name)]


def variant_index(variants, name) -> int:
    """The index of the variant called ``name`` in ``variants`` (names compared as
    :func:`variant_key` does); an InputError listing the names when there is none."""
    if isinstance(name, str):
        key = variant_key(name)
        for i, v in enumerate(variants):
            if variant_key(v.name) == key:
                return i
    names = ", ".join(excerpt(v.name) for v in variants) or "none stored yet"
    raise InputError(
        f"there is no variant named {excerpt(str(name))} (the variants: {names}); give one of "
        "those names"
    )


# --------------------------------------------------------------------------------------------
# To JSON
# --------------------------------------------------------------------------------------------
def profile_to_dict(profile: Profile) -> dict:
    """A profile as a plain JSON object (m)."""
    return {
        "name": profile.name,
        "trailing_edge": profile.trailing_edge,
        "nodes": [
            {"x": n.x, "y": n.y, "radius": n.radius, "smooth": n.smooth, "label": n.label}
            for n in profile.nodes
        ],
    }


def project_to_dict(project: Project) -> dict:
    """A project as a plain JSON object in the current format version."""
    underlay = None
    if project.underlay is not None:
        u = project.underlay
        underlay = {
            "path": u.path,
            "points_px": [list(p) for p in u.points_px],
            "points_m": [list(p) for p in u.points_m],
            "opacity": u.opacity,
        }
    return {
        "format": FORMAT_NAME,
        "version": FORMAT_VERSION,
        "units": UNITS,
        "profile": profile_to_dict(project.profile),
        "conditions": project.conditions.to_dict(),
        "baseline": None if project.baseline is None else profile_to_dict(project.baseline),
        "underlay": underlay,
        "notes": project.notes,
        "variants": [
            {"name": v.name, "profile": profile_to_dict(v.profile), "note": v.note}
            for v in project.variants
        ],
        "baseline_variant": project.baseline_variant,
    }


def save_project(project: Project, path) -> Path:
    """Save a project file atomically.

    The JSON is written to a temporary file in the same folder, flushed and fsync'ed, then
    moved over ``path`` with :func:`os.replace`: the previous file stays intact until the new one
    is complete. On failure the temporary file is removed and :class:`ProjectFileError` raised.

    Returns
    -------
    pathlib.Path
        The path written.
    """
    if not isinstance(project, Project):
        raise ProjectFileError(f"save_project needs a Project, got {type(project).__name__}")
    data = project_to_dict(project)

    def write(fh):
        json.dump(data, fh, indent=2, allow_nan=False, ensure_ascii=True)
        fh.write("\n")

    return atomic_write_text(path, write)


# --------------------------------------------------------------------------------------------
# From JSON, checking every field
# --------------------------------------------------------------------------------------------
_MISSING = object()


def _fail(path: str, what: str):
    raise ProjectFileError(f"{path}: {what}", path=path)


class _HugeInteger:
    """A whole number in the file with more than MAX_INTEGER_DIGITS digits (never converted)."""

    __slots__ = ("digits",)

    def __init__(self, text: str):
        self.digits = len(text.lstrip("-"))

    def __repr__(self):
        return f"a whole number of {self.digits} digits"


def _parse_int(text: str):
    if len(text.lstrip("-")) > MAX_INTEGER_DIGITS:
        return _HugeInteger(text)
    return int(text)


def _show(value) -> str:
    if isinstance(value, _HugeInteger):
        return repr(value)
    if isinstance(value, float) and not math.isfinite(value):
        return repr(value)
    text = (
        json.dumps(value, ensure_ascii=True)
        if isinstance(value, (str, int, float, bool, type(None)))
        else type(value).__name__
    )
    return text if len(text) <= 60 else text[:57] + "..."


def _kind(value) -> str:
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, (int, float, _HugeInteger)):
        return "a number"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "an object"
    return type(value).__name__


def _obj(value, path: str, what: str = "an object") -> dict:
    if not isinstance(value, dict):
        _fail(path, f"expected {what}, got {_kind(value)}")
    return value


def _keys(d: dict, path: str, required: tuple, optional: tuple) -> None:
    for key in required:
        if key not in d:
            _fail(
                _join(path, key),
                "missing field; add it (see the project format in profilebench.io.project)",
            )
    allowed = set(required) | set(optional)
    for key in d:
        if key not in allowed:
            _fail(
                _join(path, key),
                f"unknown field; expected only {sorted(allowed)} (check the spelling)",
            )


def _join(path: str, key: str) -> str:
    return key if not path else f"{path}.{key}"


def _number(value, path: str, unit: str = "in metres") -> float:
    if isinstance(value, _HugeInteger):
        _fail(path, f"number {unit} is too large: {_show(value)}; give a plain number")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        _fail(path, f"expected a number {unit}, got {_show(value)}")
    try:
        out = float(value)
    except OverflowError:
        _fail(path, f"number {unit} is too large: {_show(value)}")
    if not math.isfinite(out):
        _fail(path, f"expected a finite number {unit}, got {_show(value)}")
    return out


def _string(value, path: str) -> str:
    if not isinstance(value, str):
        _fail(path, f"expected a string, got {_show(value)}")
    surrogate = next((i for i, c in enumerate(value) if "\ud800" <= c <= "\udfff"), None)
    if surrogate is not None:
        _fail(
            path,
            f"holds a lone surrogate {value[surrogate]!r} at character {surrogate}, which "
            "is not a character (no file or screen can show it); fix or retype that text",
        )
    return value


def _boolean(value, path: str) -> bool:
    if not isinstance(value, bool):
        _fail(path, f"expected true or false, got {_show(value)}")
    return value


def _node_from_dict(d, path: str) -> Node:
    d = _obj(d, path, 'a node object {"x": m, "y": m, "radius": m, "smooth": bool, "label": str}')
    _keys(d, path, ("x", "y"), ("radius", "smooth", "label"))
    x = _number(d["x"], _join(path, "x"))
    y = _number(d["y"], _join(path, "y"))
    radius = _number(d.get("radius", 0.0), _join(path, "radius"))
    smooth = _boolean(d.get("smooth", False), _join(path, "smooth"))
    label = _string(d.get("label", ""), _join(path, "label"))
    if radius < 0:
        _fail(
            _join(path, "radius"),
            f"corner radius {radius!r} m is negative; use 0 for a "
            "sharp edge or a positive radius in metres",
        )
    if smooth and radius > 0:
        _fail(
            path,
            f"node is smooth and has corner radius {radius!r} m; set radius to 0 or "
            "smooth to false",
        )
    try:
        return Node(x, y, radius, smooth, label)
    except ProfileBenchError as exc:  # pragma: no cover - the checks above cover Node's rules
        _fail(path, str(exc))


def profile_from_dict(d, path: str = "profile") -> Profile:
    """Build a :class:`Profile` from its JSON object, checking every field.

    Raises
    ------
    ProjectFileError
        Naming the first bad field by its JSON path (``path`` is the prefix used).
    """
    d = _obj(d, path, 'a profile object {"name", "trailing_edge", "nodes"}')
    _keys(d, path, ("nodes",), ("name", "trailing_edge"))
    name = _string(d.get("name", "profile"), _join(path, "name"))
    nodes_raw = d["nodes"]
    npath = _join(path, "nodes")
    if not isinstance(nodes_raw, list):
        _fail(npath, f"expected a list of node objects, got {_kind(nodes_raw)}")
    if len(nodes_raw) < 3:
        _fail(npath, f"has {len(nodes_raw)} node(s); a closed outline needs at least 3")
    if len(nodes_raw) > MAX_NODES:
        _fail(
            npath,
            f"has {len(nodes_raw)} nodes, over the limit of {MAX_NODES}; simplify the "
            "outline (fit it with fewer nodes)",
        )
    nodes = tuple(_node_from_dict(n, f"{npath}[{i}]") for i, n in enumerate(nodes_raw))
    te = d.get("trailing_edge", None)
    tpath = _join(path, "trailing_edge")
    if te is not None:
        if isinstance(te, bool) or not isinstance(te, int):
            _fail(tpath, f"expected a node index (integer) or null, got {_show(te)}")
        if not 0 <= te < len(nodes):
            _fail(tpath, f"node index {te} is out of range 0 to {len(nodes) - 1}")
    try:
        return Profile(nodes, name=name, trailing_edge=te)
    except ProfileBenchError as exc:  # pragma: no cover - the checks above cover Profile's rules
        _fail(path, str(exc))


def _points2(value, path: str, unit: str):
    if not isinstance(value, list) or len(value) != 2:
        _fail(
            path,
            f"expected two points [[a, b], [c, d]] {unit}, got {_show(value) if not isinstance(value, list) else f'a list of {len(value)}'}",
        )
    out = []
    for i, p in enumerate(value):
        ppath = f"{path}[{i}]"
        if not isinstance(p, list) or len(p) != 2:
            _fail(
                ppath,
                f"expected a point [a, b] {unit}, got {_kind(p) if not isinstance(p, list) else f'a list of {len(p)}'}",
            )
        out.append((_number(p[0], f"{ppath}[0]", unit), _number(p[1], f"{ppath}[1]", unit)))
    if out[0] == out[1]:
        _fail(path, "the two reference points are the same; pick two distinct points")
    return tuple(out)


def _underlay_from_dict(d, path: str = "underlay") -> Underlay:
    d = _obj(d, path, "an underlay object or null")
    _keys(d, path, ("path", "points_px", "points_m"), ("opacity",))
    rel = _string(d["path"], _join(path, "path"))
    if not rel.strip():
        _fail(
            _join(path, "path"),
            "empty image path; give the image path relative to the project file",
        )
    px = _points2(d["points_px"], _join(path, "points_px"), "in pixels")
    pm = _points2(d["points_m"], _join(path, "points_m"), "in metres")
    opacity = _number(d.get("opacity", 0.5), _join(path, "opacity"), "from 0 to 1")
    if not 0.0 <= opacity <= 1.0:
        _fail(_join(path, "opacity"), f"{opacity!r} is outside 0 to 1")
    return Underlay(rel, px, pm, opacity)


def project_from_dict(d) -> Project:
    """Build a :class:`Project` from a parsed project file, checking every field.

    Raises
    ------
    ProjectFileError
        Naming the first bad field by its JSON path.
    """
    d = _obj(d, "(top level)", "a JSON object")
    fmt = d.get("format", _MISSING)
    if fmt is _MISSING:
        _fail(
            "format",
            f"missing; this is not a profilebench project file (expected "
            f'"format": "{FORMAT_NAME}")',
        )
    if fmt != FORMAT_NAME:
        _fail(
            "format",
            f'is {_show(fmt)}, expected "{FORMAT_NAME}"; this is not a profilebench project file',
        )
    version = d.get("version", _MISSING)
    if version is _MISSING:
        _fail("version", f'missing; add "version": {FORMAT_VERSION}')
    if isinstance(version, bool) or not isinstance(version, int):
        _fail("version", f"expected an integer format version, got {_show(version)}")
    readable = " and ".join(str(v) for v in READ_VERSIONS)
    if version > FORMAT_VERSION:
        _fail(
            "version",
            f"file format version {version} was made by a newer profilebench "
            f"(this one reads versions {readable}); upgrade profilebench to open it",
        )
    if version not in READ_VERSIONS:
        _fail(
            "version",
            f"unknown file format version {version}; this profilebench reads versions "
            f"{readable} only",
        )
    if version == 1:
        for key in ("variants", "baseline_variant"):
            if key in d:
                _fail(
                    key,
                    'variants need format version 2, but the file says "version": 1; set '
                    '"version": 2 (or remove the field)',
                )
    _keys(
        d,
        "",
        ("format", "version", "profile", "conditions"),
        ("units", "baseline", "underlay", "notes", "variants", "baseline_variant"),
    )
    if "units" in d and d["units"] != UNITS:
        _fail(
            "units",
            f'is {_show(d["units"])}; project files are in "{UNITS}"; convert '
            "the lengths to metres and speeds to m/s",
        )
    profile = profile_from_dict(d["profile"], "profile")
    cond_raw = _obj(d["conditions"], "conditions", "a conditions object")
    for key, value in cond_raw.items():
        if isinstance(value, _HugeInteger):
            _fail(f"conditions.{key}", f"number is too large: {_show(value)}; give a plain number")
    try:
        conditions = _conditions_class().from_dict(cond_raw)
    except ProfileBenchError as exc:
        key = _conditions_key(str(exc), cond_raw)
        cpath = "conditions" if key is None else f"conditions.{key}"
        raise ProjectFileError(f"{cpath}: {exc}", path=cpath) from exc
    baseline = None
    if d.get("baseline") is not None:
        baseline = profile_from_dict(d["baseline"], "baseline")
    underlay = None
    if d.get("underlay") is not None:
        underlay = _underlay_from_dict(d["underlay"])
    notes = _string(d.get("notes", ""), "notes")
    variants = _variants_from_list(d.get("variants", []))
    baseline_variant = _baseline_variant(d.get("baseline_variant"), variants)
    return Project(profile, conditions, baseline, underlay, notes, variants, baseline_variant)


def _variant_name(value, path: str) -> str:
    name = _string(value, path)
    try:
        return check_variant_name(name, "the name")
    except InputError as exc:
        _fail(path, str(exc))


def _variants_from_list(raw) -> tuple:
    path = "variants"
    if not isinstance(raw, list):
        _fail(path, f"expected a list of variant objects, got {_kind(raw)}")
    if len(raw) > MAX_VARIANTS:
        _fail(
            path,
            f"has {len(raw)} variants, over the limit of {MAX_VARIANTS}; keep the variants "
            "still considered (delete the others)",
        )
    out, seen = [], {}
    for i, item in enumerate(raw):
        vpath = f"{path}[{i}]"
        item = _obj(item, vpath, 'a variant object {"name": str, "profile": {...}, "note": str}')
        if "name" not in item:
            _fail(_join(vpath, "name"), "missing; give every variant a name")
        name = _variant_name(item["name"], _join(vpath, "name"))
        key = variant_key(name)
        if key in seen:
            j = seen[key]
            _fail(
                _join(vpath, "name"),
                f"{excerpt(name)} is already the name of variants[{j}] "
                f"({excerpt(out[j].name)}; names must differ, "
                "ignoring case and surrounding spaces); rename one of the two",
            )
        seen[key] = i
        try:
            _keys(item, vpath, ("name", "profile"), ("note",))
            profile = profile_from_dict(item["profile"], _join(vpath, "profile"))
            note = _string(item.get("note", ""), _join(vpath, "note"))
        except ProjectFileError as exc:
            raise ProjectFileError(f"{exc} (in variant {excerpt(name)})", path=exc.path) from None
        out.append(Variant(name, profile, note))
    return tuple(out)


def _baseline_variant(value, variants):
    if value is None:
        return None
    name = _string(value, "baseline_variant")
    if not any(v.name == name for v in variants):
        names = ", ".join(excerpt(v.name) for v in variants) or "none"
        _fail(
            "baseline_variant",
            f"{excerpt(name)} is not the name of a variant in this file (its variants: "
            f"{names}); give one of those names exactly, or null to rank against the first",
        )
    return name


def _conditions_key(message: str, raw: dict) -> str | None:
    """The conditions key a ConditionsError message is about (it names the key first)."""
    words = message.split()
    if words and words[0] in raw:
        return words[0]
    for key in raw:
        if repr(key) in message:
            return key
    return None


def _reject_constant(name):
    # NaN / Infinity are not JSON; keep them as floats so the field check names the path.
    return float(name)


def _pairs_no_duplicates(pairs, counter=None):
    if counter is not None:
        counter[0] += 1
        if counter[0] > MAX_OBJECTS:
            raise ProjectFileError(
                f"the file holds more than {MAX_OBJECTS} JSON objects, more than a project of "
                f"{2 + MAX_VARIANTS} profiles (the profile, the baseline and {MAX_VARIANTS} "
                f"variants) of {MAX_NODES} nodes each has; simplify the outline or choose "
                "the right file"
            )
    out = {}
    for key, value in pairs:
        if key in out:
            raise ProjectFileError(
                f"duplicate key {key!r} in one JSON object; keep only one (the file is ambiguous)",
                path=None,
            )
        out[key] = value
    return out


def load_project(path) -> Project:
    """Read and check a project file; never modifies the file.

    Raises
    ------
    ProjectFileError
        For a missing file, a folder, an empty, oversized (over :data:`MAX_PROJECT_BYTES`,
        refused before reading), non-UTF-8, non-JSON or truncated file, a file of more than
        :data:`MAX_NODES` nodes in a profile (refused while parsing, before any node is
        built), and for the first bad field (its JSON path in the message and in ``.path``).
    """
    p = Path(path)
    shown = str(p)
    raw = read_input_bytes(p, "project file", "choose the project's .json file", MAX_PROJECT_BYTES)
    if not raw.strip():
        raise ProjectFileError(f"{shown!r} is empty; it holds no project (was a save interrupted?)")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise ProjectFileError(
            f"{shown!r} is not UTF-8 text (byte {exc.start}); it is not a profilebench project file"
        ) from exc
    counter = [0]
    try:
        data = json.loads(
            text,
            parse_constant=_reject_constant,
            parse_int=_parse_int,
            object_pairs_hook=lambda pairs: _pairs_no_duplicates(pairs, counter),
        )
    except json.JSONDecodeError as exc:
        # the parser stopped at the end, or in a string the end of the text cut open (json
        # reports a string with a line break inside as an invalid control character instead)
        if exc.pos >= len(text.rstrip()) or exc.msg.startswith("Unterminated string"):
            raise ProjectFileError(
                f"{shown!r} is truncated: the JSON ends before it is complete (line {exc.lineno}); "
                "restore it from a backup or re-save it"
            ) from exc
        raise ProjectFileError(
            f"{shown!r} is not valid JSON: {exc.msg} at line {exc.lineno} column {exc.colno}; "
            "choose a profilebench project file, or restore this one from a backup"
        ) from exc
    except RecursionError as exc:
        raise ProjectFileError(f"{shown!r} is nested too deeply to be a project file") from exc
    except ValueError as exc:  # ProjectFileError passes through; anything else the parser refuses
        if isinstance(exc, ProjectFileError):
            raise
        raise ProjectFileError(
            f"{shown!r} cannot be read as a project file ({exc}); choose a "
            "profilebench project file"
        ) from exc
    return project_from_dict(data)


# --------------------------------------------------------------------------------------------
# Underlay paths
# --------------------------------------------------------------------------------------------
def _relative_parts(rel: str):
    if any(ord(c) < 32 for c in rel):
        raise ProjectFileError(
            f"underlay.path {rel!r} holds a control character (such as NUL), which no file name "
            "can; give the image's file name relative to the project file",
            path="underlay.path",
        )
    text = rel.replace("\\", "/")
    if (
        PurePosixPath(text).is_absolute()
        or PureWindowsPath(rel).is_absolute()
        or PureWindowsPath(rel).drive
    ):
        raise ProjectFileError(
            f"underlay.path {rel!r} is absolute; store the image path relative to the project "
            "file's folder (put the image beside the project)",
            path="underlay.path",
        )
    parts = [s for s in PurePosixPath(text).parts if s not in ("", ".")]
    if ".." in parts:
        raise ProjectFileError(
            f'underlay.path {rel!r} leaves the project folder (".."); keep the image in the '
            "project's folder or a sub-folder of it",
            path="underlay.path",
        )
    if not parts:
        raise ProjectFileError(f"underlay.path {rel!r} names no file", path="underlay.path")
    return parts


def resolve_underlay(project: Project, project_path) -> Path | None:
    """The underlay image's absolute path, resolved against the project file's folder.

    Returns None when the project has no underlay. Refuses absolute paths and paths that leave
    the folder (through ".." or a link pointing outside) with a ProjectFileError.
    """
    if project.underlay is None:
        return None
    parts = _relative_parts(project.underlay.path)
    try:
        base = Path(project_path).resolve().parent
        target = base.joinpath(*parts).resolve()
    except (OSError, RuntimeError, ValueError) as exc:  # a loop of links (RuntimeError < 3.13)
        raise ProjectFileError(
            f"underlay.path {project.underlay.path!r} cannot be followed ({exc}); put the image "
            "itself in the project folder",
            path="underlay.path",
        ) from exc
    if not target.is_relative_to(base):
        raise ProjectFileError(
            f"underlay.path {project.underlay.path!r} resolves to {str(target)!r}, outside the "
            f"project folder {str(base)!r}; keep the image inside it",
            path="underlay.path",
        )
    return target


def underlay_relative_path(image_path, project_path) -> str:
    """The path to store in ``Underlay.path``: the image relative to the project's folder.

    Raises ProjectFileError if the image is not inside that folder (or a sub-folder).
    """
    base = Path(project_path).resolve().parent
    image = Path(image_path).resolve()
    if not image.is_relative_to(base):
        raise ProjectFileError(
            f"image {str(image)!r} is not inside the project folder {str(base)!r}; copy it "
            "there first so the project can be moved with its image",
            path="underlay.path",
        )
    return image.relative_to(base).as_posix()
