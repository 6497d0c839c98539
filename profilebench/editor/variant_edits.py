"""Edits of the project's named variants: store the profile as a variant, switch the editor to
one, rename, delete, and mark the baseline variant.

Each returns an :class:`~profilebench.editor.commands.Edit` (one undo step, exact: the states
are immutable values) or raises an :class:`~profilebench.errors.InputError` saying what is wrong
and how to fix it. Names are matched as the project file matches them (ignoring case and
surrounding spaces, :func:`profilebench.io.project.variant_key`); the variants share the
project's conditions, so a variant is a profile and a note only.
"""

from __future__ import annotations

from dataclasses import replace

from profilebench.editor.commands import Edit
from profilebench.editor.document import DocumentState
from profilebench.errors import InputError, excerpt
from profilebench.io.project import Variant, check_variants, variant_index, variant_key

__all__ = [
    "find_variant",
    "store_variant",
    "switch_to_variant",
    "rename_variant",
    "delete_variant",
    "set_baseline_variant",
    "suggest_name",
]


def find_variant(state: DocumentState, name: str) -> int:
    """The index of the variant called ``name`` in ``state``."""
    return variant_index(state.variants, name)


def _with(state, variants, baseline_variant, text):
    variants = check_variants(variants, baseline_variant)
    return Edit(text, state, replace(state, variants=variants, baseline_variant=baseline_variant))


def suggest_name(state: DocumentState) -> str:
    """A name no variant has yet: "variant N" with the smallest N from the count up."""
    taken = {variant_key(v.name) for v in state.variants}
    n = len(state.variants) + 1
    while f"variant {n}" in taken:
        n += 1
    return f"variant {n}"


def store_variant(state: DocumentState, name: str, note: str = "", overwrite: bool = False) -> Edit:
    """Store the current profile as the variant ``name`` (appended at the end). With
    ``overwrite`` a variant of that name gets the current profile (and ``note``, when given) in
    its place; without, an existing name is refused."""
    variant = Variant(name, state.profile, note)  # checks the name and the note
    variants = list(state.variants)
    try:
        i = find_variant(state, name)
    except InputError:
        i = None
    if i is not None:
        if not overwrite:
            raise InputError(
                f"a variant named {excerpt(variants[i].name)} is already stored; give another "
                "name, or store over it to replace its profile"
            )
        old = variants[i]
        variants[i] = Variant(old.name, state.profile, note or old.note)
        return _with(state, variants, state.baseline_variant, f"Store over variant {old.name}")
    variants.append(variant)
    return _with(state, variants, state.baseline_variant, f"Store variant {name}")


def switch_to_variant(state: DocumentState, name: str) -> Edit:
    """Make the variant's profile the one being edited (the variants stay as they are)."""
    v = state.variants[find_variant(state, name)]
    return Edit(f"Switch to variant {v.name}", state, replace(state, profile=v.profile))


def rename_variant(state: DocumentState, name: str, new_name: str) -> Edit:
    """Rename a variant (the baseline mark follows it)."""
    i = find_variant(state, name)
    old = state.variants[i]
    variants = list(state.variants)
    variants[i] = Variant(new_name, old.profile, old.note)
    baseline = new_name if state.baseline_variant == old.name else state.baseline_variant
    return _with(state, variants, baseline, f"Rename variant {old.name} to {new_name}")


def delete_variant(state: DocumentState, name: str) -> Edit:
    """Delete a variant; when it was the baseline, the first remaining one becomes it (the
    project then names none)."""
    i = find_variant(state, name)
    old = state.variants[i]
    variants = state.variants[:i] + state.variants[i + 1 :]
    baseline = None if state.baseline_variant == old.name else state.baseline_variant
    return _with(state, variants, baseline, f"Delete variant {old.name}")


def set_baseline_variant(state: DocumentState, name: str) -> Edit:
    """Mark the variant the others are ranked against."""
    v = state.variants[find_variant(state, name)]
    return _with(state, state.variants, v.name, f"Mark {v.name} as the baseline variant")
