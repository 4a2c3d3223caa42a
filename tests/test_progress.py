"""The progress line: silent off a terminal, one rewritten line on one."""
import io

from clusterexp.progress import Progress


class FakeTerminal(io.StringIO):
    def isatty(self):
        return True


def test_quiet_when_not_a_terminal():
    stream = io.StringIO()
    progress = Progress(stream=stream, total=8)
    assert not progress.enabled
    progress.step("virial a[2,1]", order=3)
    progress.done()
    assert stream.getvalue() == ""


def test_one_updating_line_on_a_terminal():
    stream = FakeTerminal()
    progress = Progress(stream=stream, total=8, min_interval=0)
    assert progress.enabled
    progress.step("virial a[2,1]", order=3)
    assert stream.getvalue() == "\rderiving virial coefficients: order 3/8 (a[2,1])"
    progress.step("virial a[3]", order=4)
    text = stream.getvalue()
    assert text.count("\r") == 2 and "\n" not in text
    last = text.rsplit("\r", 1)[1]
    assert last.startswith("deriving virial coefficients: order 4/8 (a[3])")
    assert len(last) == len("deriving virial coefficients: order 3/8 (a[2,1])")  # padded over the old text
    progress.done()
    assert stream.getvalue().endswith("\r" + " " * len(last.rstrip()) + "\r")


def test_forced_on_and_forced_off():
    stream = io.StringIO()
    with Progress(stream=stream, enabled=True) as progress:
        progress.step("cluster b[2,2]", order=4, total=6)
    assert "deriving cluster coefficients: order 4/6 (b[2,2])" in stream.getvalue()
    terminal = FakeTerminal()
    Progress(stream=terminal, enabled=False).step("virial a[2]", order=2)
    assert terminal.getvalue() == ""


def test_redraws_within_one_order_are_throttled():
    stream = FakeTerminal()
    progress = Progress(stream=stream, total=5, min_interval=3600)
    progress.step("virial a[3,0]", order=3)
    progress.step("virial a[2,1]", order=3)
    assert stream.getvalue().count("\r") == 1
    progress.step("virial a[4,0]", order=4)  # a new order is always shown
    assert stream.getvalue().count("\r") == 2


def test_long_lines_are_cut_to_the_terminal_and_a_closed_stream_is_harmless(monkeypatch):
    monkeypatch.setenv("COLUMNS", "40")
    stream = FakeTerminal()
    progress = Progress(stream=stream, min_interval=0)
    progress.step("virial a[" + ",".join(["1"] * 30) + "]", order=30, total=30)
    assert len(stream.getvalue()) == 40  # "\r" + 39 characters
    stream.close()
    progress.step("virial a[2]", order=31)  # must not raise
    assert not progress.enabled


def test_a_stage_without_an_order_is_always_drawn():
    """Stages without an order (quadrature rules, clusters: each long) are drawn even when the one before
    ended within min_interval; before, a fast first rule left the line on it while the second ran."""
    stream = io.StringIO()
    progress = Progress(stream=stream, enabled=True, min_interval=60)
    progress.step("quadrature rule 1/2")
    progress.step("quadrature rule 2/2")
    assert "rule 2/2" in stream.getvalue()
    progress.step("virial a[2,0]", order=2)
    progress.step("virial a[1,1]", order=2)     # the same order within min_interval: throttled
    assert "a[1,1]" not in stream.getvalue()
