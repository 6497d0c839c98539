"""The review page and saving figures."""

import matplotlib.image as mpimg
import pytest

from fake_analysis import fake_analysis
from profilebench.assess.results import Analysis, AnalysisStatus
from profilebench.errors import InputError
from profilebench.plotting import CAUTION, review_figure, save_figure
from profilebench.plotting.review import PAGE_DPI, PAGE_SIZE


@pytest.fixture(scope="module")
def page():
    return review_figure(fake_analysis())


def test_png_has_the_page_size(page, tmp_path):
    out = save_figure(page, tmp_path / "review.png")
    assert out.stat().st_size > 10_000
    img = mpimg.imread(out)  # matplotlib's own PNG reader
    assert img.shape[:2] == (round(PAGE_SIZE[1] * PAGE_DPI), round(PAGE_SIZE[0] * PAGE_DPI))


@pytest.mark.parametrize("name, magic", [("r.svg", b"<?xml"), ("r.pdf", b"%PDF")])
def test_vector_formats(page, tmp_path, name, magic):
    out = save_figure(page, tmp_path / name)
    assert out.read_bytes()[: len(magic)] == magic


def test_caution_line_on_the_page(page):
    assert CAUTION in [t.get_text() for t in page.texts]


def test_caution_wording():
    assert CAUTION == (
        "Screening estimate: confirm by wind-tunnel test or validated CFD, under "
        "local vehicle codes and licensed engineering practice."
    )


def test_summary_table_shows_cd_and_force(page):
    cells = [
        c.get_text().get_text()
        for ax in page.axes
        for t in ax.tables
        for c in t.get_celld().values()
    ]
    a = fake_analysis()
    assert f"{a.drag.cd:.4f}" in cells
    assert f"{a.drag.force:.2f}" in cells
    for c in a.corners:
        assert c.label in cells


@pytest.mark.parametrize("name", ["r.bmp", "r", "r.png.txt"])
def test_unknown_extension_is_bad_input(page, tmp_path, name):
    with pytest.raises(InputError, match="use one of .png, .svg, .pdf"):
        save_figure(page, tmp_path / name)
    assert list(tmp_path.iterdir()) == []


def test_missing_folder_is_bad_input(page, tmp_path):
    with pytest.raises(InputError, match="does not exist"):
        save_figure(page, tmp_path / "nope" / "r.png")


def test_failed_analysis_still_gives_a_page(tmp_path):
    a = fake_analysis()
    failed = Analysis(
        AnalysisStatus.INVALID_GEOMETRY, "outline crosses itself", a.profile, a.conditions
    )
    fig = review_figure(failed)
    texts = [t.get_text() for ax in fig.axes for t in ax.texts]
    assert any("outline crosses itself" in t for t in texts)
    assert save_figure(fig, tmp_path / "f.png").stat().st_size > 0


def test_review_needs_an_analysis():
    with pytest.raises(InputError, match="needs an Analysis"):
        review_figure("x")
