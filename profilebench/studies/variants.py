"""Ranking the named variants of a project: which of them to take into the tunnel.

:func:`rank_variants` analyses every variant at the same conditions (the project's: the
variants have none of their own, so that the ranking compares shapes only), through
:func:`~profilebench.studies.runner.run_points` (in parallel, cancellable, and from the point
cache when a variant was analysed before), and returns a frozen :class:`VariantTable`: per variant
Cd, CdA, drag force and power, the deltas against the baseline variant from
:func:`profilebench.assess.compare.compare`, each corner's verdict and the status. A variant whose
analysis fails is a row of the table with its status and message, never an exception.

The ranking key. A lower Cd can still mean more drag force when the frontal area grows (a rule of
the trade; common practice, no source), so by default the variants are ranked by the drag force
whenever every successful variant has a reference area (the conditions give a width, the area
being that width times each variant's own frontal height h, or a frontal area), and by Cd
otherwise; :attr:`VariantTable.key_reason` says which and why. At the one speed and air of a
ranking, force = q CdA, so ranking by force and by CdA give the same order. With a fixed frontal
area every variant has the same area and CdA and force rank exactly as Cd (the table's notes say
so: give the width instead for areas that follow each variant's height). Failed variants come
last, unranked, in their stored order; ties keep the stored order.

Each row is a screening estimate, to be confirmed by wind tunnel or validated CFD.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from profilebench.assess.compare import compare
from profilebench.assess.conditions import Conditions
from profilebench.errors import InputError
from profilebench.io.project import Project, Variant, check_variants, variant_index
from profilebench.studies.points import CornerPoint, PointSpec, PointStatus
from profilebench.studies.runner import RunStats, run_points

__all__ = [
    "RANK_KEYS",
    "VariantRow",
    "VariantTable",
    "corner_key",
    "rank_variants",
    "rank_project",
]

#: the quantities a ranking may be ordered by (lowest first), and how they are named
RANK_KEYS = {"force": "drag force", "cda": "CdA", "cd": "Cd"}


@dataclass(frozen=True)
class VariantRow:
    """One variant's line of the ranking (SI units: m^2, N, W; deltas are this minus the
    baseline; None where the analysis failed or gave no such number)."""

    name: str
    note: str
    profile: object  # profilebench.geometry.profile.Profile
    status: PointStatus
    message: str
    rank: int | None  # 1 = least of the ranking key; None for a failed variant
    is_baseline: bool
    cd: float | None = None
    cda: float | None = None
    force: float | None = None
    power: float | None = None
    reference_height: float | None = None  # h, m
    reference_area: float | None = None  # m^2
    delta_cd: float | None = None
    delta_cd_percent: float | None = None
    delta_cda: float | None = None
    delta_force: float | None = None
    delta_power: float | None = None
    corners: tuple[CornerPoint, ...] = ()
    warnings: tuple[str, ...] = ()  # what the comparison with the baseline warns of

    @property
    def success(self) -> bool:
        return self.status is PointStatus.SUCCESS

    def verdicts(self) -> dict:
        """{corner: Verdict} of this variant, each corner by its label, else "node N" (the way
        :func:`profilebench.assess.compare.compare` matches corners)."""
        return {corner_key(c): c.verdict for c in self.corners}


def corner_key(corner) -> str:
    """A corner's name in a ranking: its label, else "node N"."""
    return corner.label or f"node {corner.node}"


@dataclass(frozen=True)
class VariantTable:
    """The variants ranked: ``rows`` in ranking order (failed variants last), the key they are
    ranked by and why, the baseline variant's name, the shared conditions, notes, and what the
    run did (:class:`~profilebench.studies.runner.RunStats`)."""

    rows: tuple[VariantRow, ...]
    key: str
    key_reason: str
    baseline: str
    conditions: Conditions
    notes: tuple[str, ...]
    stats: RunStats

    def __len__(self):
        return len(self.rows)

    @property
    def failed(self) -> tuple[VariantRow, ...]:
        """The rows whose analysis did not succeed (cancelled ones included)."""
        return tuple(r for r in self.rows if not r.success)

    @property
    def cancelled(self) -> bool:
        return self.stats.cancelled

    @property
    def corner_keys(self) -> tuple[str, ...]:
        """Every corner of the variants (:func:`corner_key`), in the order they first appear
        in the rows."""
        keys = {}
        for r in self.rows:
            for c in r.corners:
                keys.setdefault(corner_key(c), None)
        return tuple(keys)

    @property
    def baseline_row(self) -> VariantRow:
        return next(r for r in self.rows if r.is_baseline)

    def row(self, name: str) -> VariantRow:
        """The row of the variant called ``name`` (ignoring case and surrounding spaces)."""
        return self.rows[variant_index(self.rows, name)]


def _as_variants(variants) -> tuple:
    if isinstance(variants, Project):
        return variants.variants
    out = []
    for i, v in enumerate(variants):
        if isinstance(v, Variant):
            out.append(v)
        elif isinstance(v, tuple) and len(v) == 2:
            out.append(Variant(*v))
        else:
            raise InputError(
                f"variants[{i}] must be a Variant or a (name, Profile) pair, got {type(v).__name__}"
            )
    return check_variants(out)


def _choose_key(key, results):
    ok = [r for r in results if r.success]
    with_area = bool(ok) and all(r.cda is not None for r in ok)
    if key is None:
        if with_area:
            return "force", (
                "ranked by drag force: a reference area is known, so the force shows what a "
                "larger frontal area costs even where the Cd is lower"
            )
        return "cd", (
            "ranked by Cd: no frontal area or width is given, so there is no CdA or force to "
            "rank by (give the width for them)"
        )
    if key not in RANK_KEYS:
        raise InputError(
            f"ranking key {key!r} is not known; give one of {', '.join(RANK_KEYS)} (or none "
            "for the force when a frontal area is known, else Cd)"
        )
    if key != "cd" and ok and not with_area:
        raise InputError(
            f"cannot rank by {RANK_KEYS[key]}: no frontal area or width is given; give the "
            "width (or a frontal area), or rank by cd"
        )
    return key, f"ranked by {RANK_KEYS[key]}, as asked"


def _notes(conditions, results, baseline_name, baseline_result):
    notes = []
    if conditions.frontal_area is not None and any(r.success for r in results):
        notes.append(
            f"every variant has the same frontal area ({conditions.frontal_area:g} m^2, given "
            "as such): CdA and force rank exactly as Cd; give the width instead so that each "
            "variant's area follows its own frontal height"
        )
    if not baseline_result.success:
        notes.append(
            f"the baseline variant {baseline_name!r} did not succeed "
            f"({baseline_result.status.value}): no deltas against it"
        )
    return tuple(notes)


def rank_variants(
    variants,
    conditions,
    baseline=None,
    key=None,
    workers=None,
    progress=None,
    cancel=None,
    cache=None,
    table=None,
    thickness=None,
    start_method=None,
) -> VariantTable:
    """Analyse ``variants`` at ``conditions`` and rank them (see the module docstring).

    Parameters
    ----------
    variants : sequence of Variant (or (name, Profile) pairs), or a Project
        At least one; names unique (ignoring case and surrounding spaces).
    conditions : Conditions
        The conditions every variant is analysed at.
    baseline : str, optional
        The name of the variant the deltas are taken against; default the first.
    key : {"force", "cda", "cd"}, optional
        What to rank by (lowest first); default the force when every successful variant has a
        reference area, else Cd.
    workers, progress, cancel, cache, start_method
        As :func:`~profilebench.studies.runner.run_points` (``progress(done, total, index,
        result)``; a cancelled ranking returns the variants not run as "cancelled" rows).
    table, thickness
        The r/t table and the thickness t (m) of the analysis, as ``analyze``'s.
    """
    variants = _as_variants(variants)
    if not variants:
        raise InputError(
            "there are no variants to rank; store at least one (the baseline) and the variants "
            "to compare with it"
        )
    if not isinstance(conditions, Conditions):
        raise InputError(f"conditions must be a Conditions, got {type(conditions).__name__}")
    base_index = 0 if baseline is None else variant_index(variants, baseline)
    specs = [PointSpec(v.profile, conditions, thickness=thickness, table=table) for v in variants]
    results, stats = run_points(
        specs,
        workers=workers,
        progress=progress,
        cancel=cancel,
        cache=cache,
        start_method=start_method,
    )
    key, reason = _choose_key(key, results)
    base = results[base_index]
    order = sorted(
        (i for i, r in enumerate(results) if r.success and getattr(r, key) is not None),
        key=lambda i: getattr(results[i], key),
    )
    ranked = set(order)
    order += [i for i in range(len(results)) if i not in ranked]
    rows = []
    for rank, i in enumerate(order, start=1):
        v, r = variants[i], results[i]
        rows.append(_row(v, r, base, i == base_index, rank if i in ranked else None))
    return VariantTable(
        tuple(rows),
        key,
        reason,
        variants[base_index].name,
        conditions,
        _notes(conditions, results, variants[base_index].name, base),
        stats,
    )


def _row(variant, result, base, is_baseline, rank):
    numbers = {}
    if result.success:
        numbers = dict(
            cd=result.cd,
            cda=result.cda,
            force=result.force,
            power=result.power,
            reference_height=result.reference_height,
            reference_area=result.reference_area,
            corners=result.corners,
        )
        if base.success:
            c = compare(base, result)
            pct = c.delta_cd_percent
            numbers.update(
                delta_cd=c.delta_cd,
                delta_cd_percent=pct if math.isfinite(pct) else None,
                delta_cda=c.delta_cda,
                delta_force=c.delta_force,
                delta_power=c.delta_power,
                warnings=tuple(w for w in c.warnings if not is_baseline),
            )
    return VariantRow(
        variant.name,
        variant.note,
        variant.profile,
        result.status,
        result.message,
        rank,
        is_baseline,
        **numbers,
    )


def rank_project(project, conditions=None, key=None, **options) -> VariantTable:
    """Rank ``project``'s variants at its conditions (or ``conditions``) against its baseline
    variant (the first when it names none); ``options`` as :func:`rank_variants`."""
    if not isinstance(project, Project):
        raise InputError(f"rank_project needs a Project, got {type(project).__name__}")
    if not project.variants:
        raise InputError(
            "the project has no variants to rank; store the profile as a variant first (in the "
            "editor's variants panel, or: profilebench variants PROJECT --add NAME FILE)"
        )
    return rank_variants(
        project.variants,
        project.conditions if conditions is None else conditions,
        baseline=project.baseline_variant,
        key=key,
        **options,
    )
