"""The variants review page: the caution, every variant and its numbers, the ranking table as
the text tables give it, nothing outside the page or on top of another block, failed variants."""

import pytest

from profilebench.assess.conditions import Conditions
from profilebench.geometry.profile import Node, Profile
from profilebench.geometry.shapes import rounded_box
from profilebench.io import Variant
from profilebench.plotting.review import save_figure
from profilebench.plotting.style import CAUTION
from profilebench.plotting.variants_page import (
    MAX_DRAWN,
    RANKING_COLUMNS,
    corner_matrix,
    ranking_rows,
    variants_figure,
)
from profilebench.studies import PointCache, rank_variants

COND = Conditions(speed=30.0, width=1.8, panels=120)


def _variant(name, height, radius):
    return Variant(name, rounded_box(4.0, height, (radius, 0.1, 0.05, radius), 0.2, name=name))


def _bow_tie():
    return Profile((Node(0.0, 0.2), Node(2.0, 1.0), Node(2.0, 0.2), Node(0.0, 1.0)), name="x")


@pytest.fixture(scope="module")
def table():
    variants = (
        _variant("baseline front", 1.4, 0.1),
        _variant("rounder front with a long descriptive name", 1.4, 0.3),
        _variant("tall round", 1.6, 0.45),
        Variant("crossed outline", _bow_tie()),
    )
    return rank_variants(variants, COND, workers=1, cache=PointCache())


def _texts(fig):
    out = [t.get_text() for t in fig.texts]
    for ax in fig.axes:
        out += [t.get_text() for t in ax.texts]
        out.append(ax.get_title(loc="left"))
        out.append(ax.get_title())
        legend = ax.get_legend()
        if legend is not None:
            out += [t.get_text() for t in legend.get_texts()]
    return out


def _cells(fig):
    return [
        [c.get_text().get_text() for c in t.get_celld().values()]
        for ax in fig.axes
        for t in ax.tables
    ]


def test_the_page_carries_the_caution(table):
    fig = variants_figure(table)
    assert CAUTION in _texts(fig)


def test_the_ranking_table_is_the_text_tables_rows(table):
    fig = variants_figure(table)
    cells = _cells(fig)
    ranking = next(c for c in cells if "delta F (N)" in c)
    for header in RANKING_COLUMNS:
        assert header in ranking
    for row in ranking_rows(table):
        for value in row:
            # long names are shortened on the page; every number is shown as printed
            assert value in ranking or value.startswith("rounder front")
    corners = next(c for c in cells if "corner" in c and "#1" in c)
    header, rows = corner_matrix(table)
    assert set(header[1:]) <= set(corners)
    assert len(rows) == len(table.corner_keys)


def test_each_variant_is_drawn_with_its_numbers(table):
    fig = variants_figure(table)
    text = "\n".join(_texts(fig))
    for r in table.rows:
        if r.success:
            assert f"Cd {r.cd:.4f}" in text
            assert f"force {r.force:.1f} N" in text
    assert "crossed outline" in text and "invalid geometry" in text
    # the case is stated on the page: the tall body's lower Cd, higher force
    tall = table.row("tall round")
    assert tall.delta_cd < 0 < tall.delta_force
    assert "larger frontal area outweighs the lower Cd" in text.replace("\n", " ")


def _boxes(fig):
    r = fig.canvas.get_renderer()
    boxes = []
    for t in fig.texts:
        if t.get_text():
            boxes.append((t.get_text()[:30], t.get_window_extent(r)))
    for ax in fig.axes:
        for t in ax.tables:
            boxes.append(("table", t.get_window_extent(r)))
        for t in ax.texts:
            boxes.append((t.get_text()[:30], t.get_window_extent(r)))
        legend = ax.get_legend()
        if legend is not None:
            boxes.append(("legend", legend.get_window_extent(r)))
    return boxes


def test_nothing_is_cut_off_or_on_top_of_another_block(table, tmp_path):
    fig = variants_figure(table, title="Variants of a test body")
    fig.canvas.draw()
    w, h = fig.bbox.width, fig.bbox.height
    boxes = _boxes(fig)
    for name, bb in boxes:
        assert bb.x0 >= 0 and bb.y0 >= 0 and bb.x1 <= w and bb.y1 <= h, name
    tables = [bb for name, bb in boxes if name == "table"]
    assert len(tables) == 2
    assert not tables[0].overlaps(tables[1])
    blocks = [(n, bb) for n, bb in boxes if n != "table"]
    for name, bb in blocks:
        for t in tables:
            assert not bb.overlaps(t), name
    caution = next(bb for n, bb in boxes if CAUTION.startswith(n))
    for name, bb in boxes:
        if not CAUTION.startswith(name):
            assert not bb.overlaps(caution), name
    path = save_figure(fig, tmp_path / "variants.png")
    # a PNG file: its signature (PNG specification, section 5.2)
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_more_variants_than_drawn_are_said_to_be_in_the_tables():
    variants = tuple(_variant(f"v{k}", 1.4, 0.05 + 0.04 * k) for k in range(MAX_DRAWN + 2))
    table = rank_variants(variants, COND, workers=1, cache=PointCache())
    fig = variants_figure(table)
    assert "2 more variants in the tables" in _texts(fig)
    ranking = next(c for c in _cells(fig) if "delta F (N)" in c)
    assert all(f"v{k}" in ranking or f"v{k} (baseline)" in ranking for k in range(8))
