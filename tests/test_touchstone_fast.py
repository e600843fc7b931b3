"""The vectorised Touchstone reader returns exactly what scikit-rf's parser returns.

The reference is scikit-rf's Touchstone parser behind our line checks (an independent
general-purpose implementation). Agreement is required BIT FOR BIT, not to a tolerance: both
paths parse the decimal text with a correctly rounded conversion (Python's ``float`` and
numpy's text reader give the nearest double), and the RI/MA/DB conversions are the same
numpy expressions evaluated in the same order, so any difference at all is a bug.
Layouts follow the Touchstone File Format Specification 2.1 (IBIS, 2009), "Version 1.0 files".
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from cmcheck.measurement import touchstone as ts
from cmcheck.measurement.touchstone_fast import parse_v1


def _bits_equal(a, b) -> bool:
    a, b = np.ascontiguousarray(a), np.ascontiguousarray(b)
    if a.shape != b.shape or a.dtype != b.dtype:
        return False
    return bool(np.array_equal(a.view(np.uint8), b.view(np.uint8)))


def _assert_same(data: bytes, name: str, rank: int):
    fast = parse_v1(data, rank)
    ref = ts._parse_reference(data.decode("utf-8"), name)
    assert fast is not None, "the vectorised reader refused a plain file"
    for what, a, b in zip(("f", "s", "z0"), fast, ref):
        assert _bits_equal(a, b), what
    return fast


# --- numbers in the forms instruments and libraries print --------------------------------------

_FORMATS = ["{:.17g}", "{!r}", "{:.6e}", "{:.10g}", "{:E}", "{:+.4f}", "{:.9e}", "{:g}"]


def _fmt(x: float, style: int) -> str:
    if style == len(_FORMATS):  # three-digit exponent, as some analysers write
        m, e = f"{x:.8e}".split("e")
        return f"{m}e{int(e):+04d}"
    return _FORMATS[style].format(x)


finite = st.floats(allow_nan=False, allow_infinity=False, min_value=-1e6, max_value=1e6)
tiny_or_huge = st.floats(allow_nan=False, allow_infinity=False, min_value=1e-300, max_value=1e300)


@st.composite
def touchstone_files(draw):
    rank = draw(st.integers(1, 4))
    form = draw(st.sampled_from(["ri", "ma", "db", "RI", "Ma", "DB"]))
    unit = draw(st.sampled_from(["Hz", "kHz", "MHz", "GHz", "HZ", "ghz", "mhz"]))
    r = draw(st.sampled_from(["50", "75", "50.0", "5e1", "100"]))
    option = draw(
        st.sampled_from(
            [
                f"# {unit} S {form} R {r}",
                f"#{unit} s {form} r {r}",
                f"#\t{unit}  S\t{form} R {r}   ! trailing comment",
                f"# {unit} S {form}",  # R defaults to 50
                f"# {unit}",  # S MA R 50
                "#",  # GHz S MA R 50
            ]
        )
    )
    newline = draw(st.sampled_from(["\n", "\r\n"]))
    n = draw(st.integers(1, 6))
    f0 = draw(st.floats(1e-3, 1e3))
    steps = draw(st.lists(st.floats(1e-3, 10.0), min_size=n, max_size=n))
    freqs = np.cumsum([f0, *steps[:-1]])
    if rank != 2 and draw(st.booleans()):
        freqs = freqs[::-1]  # 1-, 3- and 4-ports have no noise block: order is the caller's problem
    number = st.one_of(finite, tiny_or_huge, st.just(0.0), st.just(-0.0))
    style = draw(st.integers(0, len(_FORMATS)))

    def sep():
        return draw(st.sampled_from([" ", "  ", "\t", " \t "]))

    lines = [f"! {draw(st.text(alphabet='abc xyz=:#[]!°', max_size=20))}"]
    lines.append(option)
    for fk in freqs:
        values = [_fmt(float(fk), style)] + [_fmt(draw(number), style) for _ in range(2 * rank * rank)]
        if rank <= 2:
            chunks = [values]
        else:
            # Spec: each matrix row on a new line, at most 4 pairs a line; any wrap scikit-rf
            # reads the same way: the frequency shares its line with at least one number.
            row = 2 * rank
            chunks = []
            for i in range(rank):
                part = values[1 + i * row : 1 + (i + 1) * row]
                cut = draw(st.sampled_from([row, 2, 4, 1, 3]))
                chunks += [part[j : j + cut] for j in range(0, row, cut)]
            if draw(st.booleans()) and len(chunks) > 1:
                chunks[0] = chunks[0] + chunks.pop(1)  # rows run together
            chunks[0] = [values[0]] + chunks[0]
        for c in chunks:
            lead = draw(st.sampled_from(["", " ", "\t"]))
            tail = draw(st.sampled_from(["", " ", "\t", " ! note", "!x"]))
            lines.append(lead + sep().join(c) + tail)
            if draw(st.integers(0, 5)) == 0:
                lines.append(draw(st.sampled_from(["", "   ", "! between", "  ! indented comment"])))
    text = newline.join(lines) + draw(st.sampled_from(["", newline]))
    return text.encode("utf-8"), f"gen.s{rank}p", rank


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(touchstone_files())
def test_vectorised_reader_equals_scikit_rf(case):
    data, name, rank = case
    _assert_same(data, name, rank)


def test_scikit_rf_writer_files_agree(tmp_path):
    # Files written by scikit-rf's own Touchstone writer, every format and port count.
    import skrf

    rng = np.random.default_rng(3)
    f = np.linspace(1e6, 50e6, 7)
    for nports in (1, 2, 3, 4):
        s = (rng.normal(size=(f.size, nports, nports)) + 1j * rng.normal(size=(f.size, nports, nports))) * 0.3
        ntwk = skrf.Network(frequency=skrf.Frequency.from_f(f, unit="hz"), s=s, z0=50.0, name="w")
        for form in ("ri", "ma", "db"):
            ntwk.write_touchstone(filename=f"w{form}", dir=str(tmp_path), form=form)
            p = tmp_path / f"w{form}.s{nports}p"
            _assert_same(p.read_bytes(), p.name, nports)


# --- what the vectorised reader must leave to scikit-rf ----------------------------------------

DOUBTFUL = {
    "nan": "# Hz S RI R 50\n1 nan 0\n2 0.1 0\n",
    "noise block": "# Hz S RI R 50\n1 0 0 0.9 0 0.9 0 0 0\n2 0 0 0.8 0 0.8 0 0 0\n1 1.5 0.5 20 0.3\n",
    "two-port going back": "# Hz S RI R 50\n1 0 0 0.9 0 0.9 0 0 0\n3 0 0 0.8 0 0.8 0 0 0\n2 0 0 0.8 0 0.8 0 0 0\n",
    "Z parameters": "# Hz Z RI R 50\n1 10 0\n2 10 0\n",
    "per-port references": "# Hz S RI R 50 75\n1 0.1 0\n2 0.1 0\n",
    "version 2": "[Version] 2.0\n# Hz S RI R 50\n[Number of Ports] 1\n1 0.1 0\n2 0.1 0\n",
    "two option lines": "# Hz S RI R 50\n1 0.1 0\n# MHz S RI R 50\n2 0.1 0\n",
    "data before option line": "1 0.1 0\n# Hz S RI R 50\n2 0.1 0\n",
    "bad token": "# Hz S RI R 50\n1 0.1 0\n2 0.1-3 0\n",
    "wrapped one-port": "# Hz S RI R 50\n1 0.1\n0\n2 0.1 0\n",
    "lone frequency line": "# Hz S RI R 50\n1\n" + "0.1 0 " * 9 + "\n",
    "bare CR line ends": "# Hz S RI R 50\r1 0.1 0\r2 0.1 0\r",
    "port impedance comment": "# Hz S RI R 50\n! Port Impedance 50 0\n1 0.1 0\n2 0.1 0\n",
    "unknown unit": "# THz S RI R 50\n1 0.1 0\n2 0.1 0\n",
    # scikit-rf before 2.0 reads these differently from later versions: left to the one installed.
    "indented option line": "  # Hz S RI R 50\n1 0.1 0\n2 0.1 0\n",
    "comment after a short option line": "# Hz S RI ! x\n1 0.1 0\n2 0.1 0\n",
    "same, after a '#' in a comment": "! rev #3\n# Hz S RI ! x\n1 0.1 0\n2 0.1 0\n",
    "vertical tab in option line": "# Hz\vS RI R 50\n1 0.1 0\n2 0.1 0\n",
    "form feed in a comment": "! a\fb\n# Hz S RI R 50\n1 0.1 0\n2 0.1 0 ! x\fy\n",
    "hash in a data line": "# Hz S RI R 50\n1 0.1 0 # 1\n2 0.1 0\n",
}


@pytest.mark.parametrize("case", sorted(DOUBTFUL))
def test_doubtful_files_are_left_to_scikit_rf(case):
    text = DOUBTFUL[case]
    rank = 3 if case == "lone frequency line" else 2 if "two" in case or "noise" in case else 1
    assert parse_v1(text.encode(), rank) is None


def test_every_real_file_agrees(real_dir):
    # Independent real measurements (SOURCES.md): each one the vectorised reader takes must
    # give what scikit-rf gives; most must be taken, or the fast path would be idle.
    files = sorted(p for p in real_dir.rglob("*") if p.suffix.lower() in {".s1p", ".s2p", ".s3p", ".s4p"})
    assert files
    taken = 0
    for p in files:
        data = p.read_bytes()
        rank = int(p.suffix[2])
        fast = parse_v1(data, rank) if data.isascii() else None
        if fast is None:
            continue
        taken += 1
        ref = ts._parse_reference(data.decode("utf-8"), str(p))
        for what, a, b in zip(("f", "s", "z0"), fast, ref):
            assert _bits_equal(a, b), f"{p.name}: {what}"
    assert taken * 2 > len(files), f"only {taken} of {len(files)} real files took the vectorised reader"
