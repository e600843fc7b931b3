"""Safe Touchstone reading: what scikit-rf lets through silently must be caught here.

Layout rules are those of the Touchstone File Format Specification 2.1 (IBIS, 2009), whose
Version 1.0 section defines the option line and the data lines; scikit-rf's own writer makes
the reference files.
"""

from __future__ import annotations

import pickle
import warnings

import numpy as np
import pytest
import skrf

from cmcheck.errors import CmcheckWarning, TouchstoneError
from cmcheck.measurement.touchstone import read_touchstone

F = np.linspace(1e6, 50e6, 11)


def _network(nports, seed=0, z0=50.0):
    rng = np.random.default_rng(seed)
    s = (rng.normal(size=(F.size, nports, nports)) + 1j * rng.normal(size=(F.size, nports, nports))) * 0.2
    return skrf.Network(frequency=skrf.Frequency.from_f(F, unit="hz"), s=s, z0=z0, name="dev")


def _write(tmp_path, name, text):
    p = tmp_path / name
    p.write_text(text)
    return p


def _s1p_lines(f, g):
    return "".join(f"{fi:.9g} {gi.real:.12g} {gi.imag:.12g}\n" for fi, gi in zip(f, g))


@pytest.mark.parametrize("nports", [1, 2, 3, 4])
@pytest.mark.parametrize("form", ["ri", "ma", "db"])
def test_reads_what_scikit_rf_writes(tmp_path, nports, form):
    # scikit-rf's Touchstone writer (independent) → our reader returns the same S-parameters.
    ntwk = _network(nports, seed=nports)
    ntwk.write_touchstone(filename="dev", dir=str(tmp_path), form=form)
    sp = read_touchstone(tmp_path / f"dev.s{nports}p")
    assert sp.n_ports == nports and sp.z0 == 50.0
    assert np.allclose(sp.frequency_hz, F, rtol=1e-12)
    assert np.allclose(sp.s, ntwk.s, rtol=1e-6, atol=1e-9)


def test_option_line_units_and_reference(tmp_path):
    # Touchstone 2.1 spec, option line: frequency unit MHz, magnitude-angle, R 75.
    p = _write(tmp_path, "a.s1p", "! comment\n# MHz S MA R 75\n1 0.5 90\n2 0.25 -90 ! trailing comment\n")
    sp = read_touchstone(p)
    assert sp.z0 == 75.0
    assert np.allclose(sp.frequency_hz, [1e6, 2e6])
    assert np.allclose(sp.s[:, 0, 0], [0.5j, -0.25j])


def test_version_2_file(tmp_path):
    # Touchstone 2.1 spec: [Version] 2.0 with keywords; two-port order 12_21 given explicitly.
    text = (
        "[Version] 2.0\n# Hz S RI R 50\n[Number of Ports] 2\n[Two-Port Data Order] 12_21\n"
        "[Number of Frequencies] 2\n[Network Data]\n"
        "1e6 0.1 0 0.2 0 0.9 0 0.1 0\n2e6 0.1 0 0.3 0 0.8 0 0.1 0\n[End]\n"
    )
    sp = read_touchstone(_write(tmp_path, "v2.ts", text))
    assert sp.n_ports == 2
    assert np.allclose(sp.param(2, 1), [0.9, 0.8])  # S21 is the third pair in 12_21 order


def test_z0_override_and_bad_z0(tmp_path):
    # Touchstone 2.1 spec: R gives the reference; a complex one needs an explicit override here.
    p = _write(tmp_path, "c.s1p", "# Hz S RI R 50+5j\n1e6 0.1 0\n2e6 0.1 0\n")
    with pytest.raises(TouchstoneError, match="real and positive"):
        read_touchstone(p)
    assert read_touchstone(p, z0=50.0).z0 == 50.0


# --- refused files: one line, naming the file ------------------------------------------------

class _Payload:
    """Unpickling this would create a file: the test fails if it ever appears."""

    def __init__(self, target):
        self.target = str(target)

    def __reduce__(self):
        return (open, (self.target, "w"))


@pytest.mark.parametrize("protocol", [0, 2, pickle.HIGHEST_PROTOCOL])
def test_pickle_is_refused_and_never_runs(tmp_path, protocol):
    # scikit-rf's Network(path) would pickle.load this; our reader only parses text.
    target = tmp_path / "pwned.txt"
    p = tmp_path / "x.s2p"
    p.write_bytes(pickle.dumps(_Payload(target), protocol=protocol))
    with pytest.raises(TouchstoneError, match=r"x\.s2p: "):
        read_touchstone(p)
    assert not target.exists()


BAD = {
    "empty": ("e.s1p", "", "empty file"),
    "header only": ("h.s1p", "! only comments\n# Hz S RI R 50\n", "no data points"),
    "truncated last line": ("t.s2p", "# Hz S RI R 50\n1e6 1 0 0 0 0 0 1 0\n2e6 1 0 0 0 0", "last line truncated"),
    "damaged middle line": ("d.s1p", "# Hz S RI R 50\n1e6 0.1 0\n2e6 0.1\n3e6 0.1 0\n", "line 3 holds 2 numbers"),
    "text garbage": ("g.s1p", "hello world\nthis is not a sweep\n", "'hello' is not a number"),
    "1-port body in .s2p": ("o.s2p", "# Hz S RI R 50\n1e6 0.1 0\n2e6 0.1 0\n", "a 1-port sweep saved as .s2p"),
    "one point": ("p.s1p", "# Hz S RI R 50\n1e6 0.1 0\n", "only 1 usable point"),
    "no finite point": ("n.s1p", "# Hz S RI R 50\n1e6 nan 0\n2e6 inf 0\n", "no finite data point"),
    "backwards": ("b.s1p", "# Hz S RI R 50\n" + _s1p_lines(F[::-1], np.full(F.size, 0.1)), "out of order"),
    "bad unit": ("u.s1p", "# parsec S RI R 50\n1e6 0.1 0\n2e6 0.1 0\n", "unknown frequency unit"),
    "wrong extension": ("w.txt", "# Hz S RI R 50\n1e6 0.1 0\n2e6 0.1 0\n", "not a Touchstone file name"),
    "five ports": ("f.s5p", "# Hz S RI R 50\n", "5-port files are not supported"),
    "binary": ("bin.s1p", "\x00\x01\x02garbage", "binary data"),
}


@pytest.mark.parametrize("case", sorted(BAD))
def test_bad_files_give_one_line_naming_the_file(tmp_path, case):
    # Issue 3 acceptance: each bad file is one error "FILE: problem" (one line).
    name, text, msg = BAD[case]
    p = _write(tmp_path, name, text)
    with pytest.raises(TouchstoneError) as info:
        read_touchstone(p)
    text_err = str(info.value)
    assert text_err.startswith(f"{p}: ") and "\n" not in text_err
    assert msg in text_err


def test_missing_file_and_directory(tmp_path):
    # common practice, no published source: the message names the path.
    with pytest.raises(TouchstoneError, match="not found"):
        read_touchstone(tmp_path / "missing.s1p")
    d = tmp_path / "dir.s1p"
    d.mkdir()
    with pytest.raises(TouchstoneError, match="is a folder, expected a regular file"):
        read_touchstone(d)


# --- usable but doubtful: warned and cleaned -------------------------------------------------

def test_a_few_nan_points_are_excluded_with_a_count(tmp_path):
    # Issue 3: NaN/inf points are excluded with a warning that says how many.
    g = np.full(F.size, 0.2 + 0.1j)
    lines = _s1p_lines(F, g).splitlines()
    lines[3] = f"{F[3]:.9g} nan 0"
    lines[6] = f"{F[6]:.9g} 0.1 inf"
    p = _write(tmp_path, "nan.s1p", "# Hz S RI R 50\n" + "\n".join(lines) + "\n")
    with pytest.warns(CmcheckWarning, match=r"2 of 11 points have NaN/infinite"):
        sp = read_touchstone(p)
    assert sp.frequency_hz.size == 9 and sp.dropped_nonfinite == 2
    assert np.all(np.isfinite(sp.s))


def test_overlapping_sweep_one_port(tmp_path):
    # Issue 3: an instrument sweeping in segments repeats frequencies; keep a strictly
    # increasing sweep (the first segment's points) and warn.
    f1, f2 = np.linspace(1e6, 10e6, 10), np.linspace(8e6, 20e6, 13)
    g1, g2 = np.full(10, 0.1 + 0j), np.full(13, 0.3 + 0j)
    p = _write(tmp_path, "ov.s1p", "# Hz S RI R 50\n" + _s1p_lines(f1, g1) + _s1p_lines(f2, g2))
    with pytest.warns(CmcheckWarning, match="overlapping sweep segments.*dropped 3 repeated points"):
        sp = read_touchstone(p)
    assert np.all(np.diff(sp.frequency_hz) > 0) and sp.frequency_hz.size == 20
    assert np.allclose(sp.s[sp.frequency_hz <= 10e6, 0, 0], 0.1)


def test_overlapping_sweep_two_port_is_not_taken_for_noise_data(tmp_path):
    # scikit-rf treats data after a backwards frequency step in a version-1 two-port file as
    # noise parameters and drops them silently; those are sweep points and must be kept.
    def block(f, s21):
        return "".join(f"{fi:.9g} 0 0 {s21} 0 {s21} 0 0 0\n" for fi in f)

    f1, f2 = np.linspace(1e6, 10e6, 10), np.linspace(9e6, 30e6, 12)
    p = _write(tmp_path, "ov.s2p", "# Hz S RI R 50\n" + block(f1, 0.9) + block(f2, 0.5))
    with pytest.warns(CmcheckWarning, match="overlapping"):
        sp = read_touchstone(p)
    assert sp.frequency_hz[-1] == pytest.approx(30e6)
    assert np.all(np.diff(sp.frequency_hz) > 0)
    assert np.allclose(sp.param(2, 1)[sp.frequency_hz > 10e6], 0.5)


def test_noise_parameters_after_two_port_data_are_ignored(tmp_path):
    # Touchstone 2.1 spec (Version 1.0 noise parameters): 5 numbers a line after the network data.
    text = "# Hz S RI R 50\n1e6 0 0 0.9 0 0.9 0 0 0\n2e6 0 0 0.8 0 0.8 0 0 0\n1e6 1.5 0.5 20 0.3\n2e6 1.6 0.5 25 0.3\n"
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        sp = read_touchstone(_write(tmp_path, "nz.s2p", text))
    assert sp.frequency_hz.size == 2 and np.allclose(sp.param(2, 1), [0.9, 0.8])


def test_latin1_comment_is_read(tmp_path):
    # common practice, no published source: old instruments write Latin-1 comments.
    p = tmp_path / "l.s1p"
    p.write_bytes("! 23 °C\n# Hz S RI R 50\n1e6 0.1 0\n2e6 0.2 0\n".encode("latin-1"))
    assert read_touchstone(p).frequency_hz.size == 2


# --- damage never escapes as a crash ----------------------------------------------------------

def _two_port_text(n=12):
    f = np.linspace(1e6, 30e6, n)
    rng = np.random.default_rng(7)
    v = rng.normal(size=(n, 8)) * 0.3
    body = "".join(f"{fi:.9g} " + " ".join(f"{x:.9g}" for x in row) + "\n" for fi, row in zip(f, v))
    return "! made for a test\n# Hz S RI R 50\n" + body


from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_damaged_files_read_or_refuse_cleanly(data):
    # Issue 3: damaged input is either read into a valid sweep or refused with a one-line
    # TouchstoneError naming the file, never another exception (common practice for parsers
    # of untrusted input, no published source).
    from cmcheck.measurement.touchstone import parse_touchstone_bytes

    raw = _two_port_text().encode()
    kind = data.draw(st.sampled_from(["truncate", "delete", "insert", "duplicate", "swap"]))
    i = data.draw(st.integers(0, len(raw) - 1))
    j = data.draw(st.integers(i, min(len(raw), i + 40)))
    if kind == "truncate":
        raw = raw[:i]
    elif kind == "delete":
        raw = raw[:i] + raw[j:]
    elif kind == "insert":
        raw = raw[:i] + data.draw(st.binary(min_size=1, max_size=12)) + raw[i:]
    elif kind == "duplicate":
        raw = raw[:j] + raw[i:j] + raw[j:]
    else:
        raw = raw[:i] + raw[i:j][::-1] + raw[j:]
    name = data.draw(st.sampled_from(["d.s2p", "d.s1p"]))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CmcheckWarning)
        try:
            sp = parse_touchstone_bytes(raw, name)
        except TouchstoneError as exc:
            assert str(exc).startswith(f"{name}: ") and "\n" not in str(exc)
            return
    assert sp.frequency_hz.size >= 2 and np.all(np.diff(sp.frequency_hz) > 0)
    assert np.all(np.isfinite(sp.s)) and sp.z0 > 0
