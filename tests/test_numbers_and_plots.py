"""One number formatter per column, and the plot files: format from the extension, one style.

Formatting and plotting rules are the project's own (contributor guide; common practice, no
published source).
"""

from __future__ import annotations

import io

import numpy as np
import pytest

from cmcheck.curve import ImpedanceCurve
from cmcheck.reporting.numbers import column_formatter, format_number, frequency_formatter, unsigned_zero
from cmcheck.reporting.plots import figure_bytes, plot_figure, short_labels
from cmcheck.reporting.results import Column, Figure, Series, Table
from cmcheck.reporting.text import format_column
from cmcheck.units import parse_band

PREDICT = ("predict", "--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm",
           "--turns", "8", "--cable-od", "5mm", "--band", "1.8-30MHz")


def test_one_column_one_format():
    # The finding: a column showed 1e+04, 11,180 and 1000 side by side.
    col = Column("r", "R [Ω]", "Ω", "num", ".9g")
    shown = format_column([9999.7, 11180.2, 1000.0, 523.4], col)
    assert shown == ["10,000", "11,180", "1,000", "523"]
    assert all("e+" not in s for s in shown)
    # Widely spread values all take SI prefixes, four significant figures.
    assert format_column([1.5e6, 2200.0, 0.47], col) == ["1.500 M", "2.200 k", "470.0 m"]
    assert format_column([2e6, 999999.9], col) == ["2.000 M", "1.000 M"]


def test_decimals_follow_the_columns_spread():
    f = column_formatter([1722.2, 33.14])
    assert (f(1722.2), f(33.14)) == ("1,722.2", "33.1")
    f = column_formatter([1722.2, 1500.0])
    assert (f(1722.2), f(1500.0)) == ("1,722", "1,500")
    # The same value reads the same in running text of every command.
    assert format_number(1722.2) == "1,722" and format_number(12345.6) == "12,346"


def test_never_minus_zero():
    col = Column("x", "X [Ω]", "Ω", "num", ".9g")
    assert "-0" not in "".join(format_column([-0.0, -0.001, 1500.0], col))
    assert format_number(-0.0) == "0"
    assert unsigned_zero("-0.00") == "0.00" and unsigned_zero("-0.5") == "-0.5" and unsigned_zero("+0.0") == "+0.0"
    signed = Column("d", "imbalance [dB]", "dB", "+.2f", ".6g")
    assert format_column([-0.001, 0.25], signed) == ["0.00", "+0.25"]


def test_counts_stay_whole_numbers():
    assert format_column([1, 12, 1500], Column("n", "n", "", "num", "int")) == ["1", "12", "1,500"]


def test_frequencies_keep_distinct_values_apart():
    f = frequency_formatter([1.8e6, 1.8004e6, 30e6])
    assert f(1.8e6) != f(1.8004e6)
    assert f(30e6) == "30 MHz"


def test_short_labels_keep_the_distinguishing_part():
    short, common = short_labels(["lot/choke_09_final.s2p", "lot/choke_10_final.s2p"])
    assert short == ["09", "10"] and common == "choke_…_final.s2p"
    assert short_labels(["a.s2p"]) == (["a.s2p"], "")
    assert short_labels(["ab.s2p", "abc.s2p"])[0] == ["ab", "abc"]


def _curve(valid=None, label=""):
    f = np.geomspace(1e6, 50e6, 101)
    w = 2 * np.pi * f
    z = 1 / (1 / 2000 + 1 / (1j * w * 20e-6) + 1j * w * 2e-12)
    return ImpedanceCurve(f, z, valid, label=label)


@pytest.mark.parametrize("ext, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml"), (".pdf", b"%PDF")])
def test_format_follows_the_extension(tmp_path, ext, magic):
    p = tmp_path / f"z{ext}"
    plot_figure(p, Figure("impedance", curves=(_curve(),), band=parse_band("2-30MHz")))
    assert p.read_bytes().startswith(magic)


def test_unknown_extension_is_one_line_error_and_no_file(run_cli, tmp_path):
    code, out, err = run_cli(*PREDICT, "--plot", tmp_path / "z.jpg", "--json", tmp_path / "z.json")
    assert code == 2 and err.count("\n") == 1 and "z.jpg" in err and ".svg" in err
    assert not list(tmp_path.iterdir())


def test_svg_from_the_command_line_is_svg(run_cli, tmp_path):
    p = tmp_path / "x.svg"
    code, _, err = run_cli(*PREDICT, "--plot", p)
    assert code == 0, err
    assert b"<svg" in p.read_bytes()[:500]


def _legend_texts(figure: Figure) -> list[str]:
    from cmcheck.reporting import plots

    fig, _ = plots._render(figure)
    texts = []
    for ax in fig.axes:
        leg = ax.get_legend()
        if leg is not None:
            texts += [t.get_text() for t in leg.get_texts()]
            if leg.get_title().get_text():
                texts.append("title:" + leg.get_title().get_text())
    return texts


def test_legend_names_band_target_resonance_and_invalid_points():
    valid = np.ones(101, bool)
    valid[:10] = False
    fig = Figure("impedance", curves=(_curve(valid),), band=parse_band("2-30MHz"), target=1000.0,
                 markers=((12e6, "self-resonance 12 MHz"),))
    texts = _legend_texts(fig)
    assert "band 2 MHz–30 MHz" in texts and "target 1 kΩ" in texts
    assert "self-resonance 12 MHz" in texts and "hollow: not valid" in texts


def test_many_curves_legend_sits_outside_with_short_names():
    from cmcheck.reporting import plots

    curves = tuple(_curve(label=f"units/production-lot-7-serial-{n}-after-potting.s2p") for n in range(1040, 1048))
    fig, _ = plots._render(Figure("impedance", curves=curves, quantities=("R",)))
    ax = fig.axes[0]
    leg = ax.get_legend()
    assert [t.get_text() for t in leg.get_texts()] == [str(n) for n in range(1040, 1048)]
    fig.canvas.draw()
    # Entirely right of the data area: no legend over the curves.
    assert leg.get_window_extent().x0 >= ax.get_window_extent().x1


def test_balance_plot_has_cmrr_amplitude_and_phase_on_one_frequency_axis():
    from cmcheck.reporting import plots

    f = np.geomspace(1e6, 30e6, 50)
    s = lambda v: (Series("b.s3p", f, np.full(50, v)),)  # noqa: E731
    fig, _ = plots._render(Figure("series", series=s(25.0), y_label="CMRR [dB]",
                                  panels=(("amplitude imbalance [dB]", s(0.5)), ("phase imbalance [°]", s(2.0)))))
    axes = fig.axes
    assert [a.get_ylabel() for a in axes] == ["CMRR [dB]", "amplitude imbalance [dB]", "phase imbalance [°]"]
    assert all(a.get_shared_x_axes().joined(axes[0], a) for a in axes)
    assert axes[-1].get_xlabel() == "frequency [MHz]"


def test_frequency_unit_follows_the_span():
    from cmcheck.reporting import plots

    def unit(lo, hi):
        f = np.geomspace(lo, hi, 20)
        fig, _ = plots._render(Figure("series", series=(Series("a", f, np.ones(20)),), y_label="y"))
        return fig.axes[0].get_xlabel()

    assert unit(1e6, 30e6) == "frequency [MHz]"
    assert unit(10e3, 2e6) == "frequency [kHz]"
    assert unit(10, 900) == "frequency [Hz]"


def test_figure_bytes_are_reproducible():
    fig = Figure("impedance", curves=(_curve(),))
    assert figure_bytes(fig, "svg") == figure_bytes(fig, "svg")


def test_version_option_prints_the_package_version(run_cli):
    from importlib.metadata import version

    code, out, err = run_cli("--version")
    assert code == 0 and out.strip() == f"cmcheck {version('cmcheck')}"


def test_each_curves_self_resonance_is_marked():
    from cmcheck.curve import self_resonance

    c = _curve(label="a")
    f0 = float(self_resonance(c.frequency_hz, c.z)[0])
    texts = _legend_texts(Figure("impedance", curves=(c, _curve(label="b")), quantities=("R",), resonances=(f0, None)))
    assert "self-resonance" in texts
    assert "self-resonance" not in _legend_texts(Figure("impedance", curves=(c,), quantities=("R",)))
