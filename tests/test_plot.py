"""PNG pictures: made without a display, of sensible size; a clear message without matplotlib."""

import os
import struct
import subprocess
import sys


def png_size(path):
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    width, height = struct.unpack(">II", data[16:24])
    return width, height


def test_spread_plot(run, tmp_path, monkeypatch):
    monkeypatch.delenv("DISPLAY", raising=False)
    path = tmp_path / "spread.png"
    result = run("spread", "--r", "10k", "--c", "100n", "--tau", "1ms", "--plot", str(path))
    assert result.exit_code == 0, result.output
    width, height = png_size(path)
    assert 500 < width < 3000 and 300 < height < 2000
    assert path.stat().st_size > 10_000


def test_find_plot(run, tmp_path, monkeypatch):
    monkeypatch.delenv("DISPLAY", raising=False)
    path = tmp_path / "short.png"
    result = run("find", "--cutoff", "1kHz", "--top", "6", "--plot", str(path), "--format", "json")
    assert result.exit_code == 0, result.output
    width, height = png_size(path)
    assert 500 < width < 3000 and 200 < height < 2000


def test_without_matplotlib_says_how_to_install(tmp_path):
    script = (
        "import sys; sys.modules['matplotlib'] = None\n"
        "from rcpick.cli import main\n"
        f"sys.argv = ['rcpick', 'spread', '--r', '10k', '--c', '100n', '--plot', {str(tmp_path / 'x.png')!r}]\n"
        "main()\n"
    )
    env = {k: v for k, v in os.environ.items() if k != "DISPLAY"}
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, env=env)
    assert done.returncode == 2
    assert "pip install 'rcpick[plot]'" in done.stderr
    assert "Traceback" not in done.stderr
    assert not (tmp_path / "x.png").exists()
