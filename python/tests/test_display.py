"""Charts show inline in Jupyter (SVG, PNG) and save; charts and renders are the command line's."""

import struct
import zlib

import numpy as np
import pytest

import lamella
from conftest import SCENES

TEAL = SCENES / "teal_label_foil.json"


def png_pixels(data):
    """Decodes an 8-bit RGB, non-interlaced PNG (what lamella writes) to (H, W, 3).
    Filters per the PNG specification (W3C, Portable Network Graphics, 2nd ed., §9)."""
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    pos, chunks, idat = 8, {}, b""
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IDAT":
            idat += body
        chunks.setdefault(kind, body)
        pos += 12 + n
    w, h, depth, colour = struct.unpack(">IIBB", chunks[b"IHDR"][:10])
    assert depth == 8 and colour == 2
    raw, stride, bpp = zlib.decompress(idat), w * 3, 3
    out = np.zeros((h, stride), dtype=np.uint8)
    prev = np.zeros(stride, dtype=np.int32)
    for y in range(h):
        f, line = raw[y * (stride + 1)], np.frombuffer(raw, np.uint8, stride, y * (stride + 1) + 1).astype(np.int32)
        cur = np.zeros(stride, dtype=np.int32)
        for x in range(stride):
            a = cur[x - bpp] if x >= bpp else 0
            b, c = prev[x], prev[x - bpp] if x >= bpp else 0
            if f == 0:
                p = 0
            elif f == 1:
                p = a
            elif f == 2:
                p = b
            elif f == 3:
                p = (a + b) // 2
            else:
                pa, pb, pc = abs(b - c), abs(a - c), abs(a + b - 2 * c)
                p = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
            cur[x] = (line[x] + p) & 0xFF
        out[y], prev = cur, cur
    return out.reshape(h, w, 3)


@pytest.mark.parametrize("kind, extra, flags", [
    ("angle-strip", {}, []),
    ("spectra", {"transmittance": True, "angles": [0, 45]}, ["--transmittance", "--angles", "0,45"]),
    ("chromaticity", {}, []),
    ("ab-travel", {}, []),
    ("map", {"side": "transmit"}, ["--side", "transmit"]),
    ("thickness-angle", {"steps": 5}, ["--steps", "5"]),
])
def test_chart_is_the_cli_chart(cli, tmp_path, kind, extra, flags):
    c = lamella.chart(lamella.Scene.load(TEAL), kind=kind, size=(640, 400), **extra)
    for ext in ("svg", "png"):
        out = tmp_path / f"c.{ext}"
        run = cli("chart", TEAL, "--kind", kind, "--size", "640x400", *flags, "-o", out)
        assert run.code == 0, run.stderr
        mine = c.svg().encode() if ext == "svg" else c.png()
        assert mine == out.read_bytes()
        saved = tmp_path / f"saved.{ext}"
        c.save(saved)
        assert saved.read_bytes() == mine


def test_jupyter_display_methods():
    c = lamella.chart(lamella.Scene.load(TEAL), size=(480, 320))
    svg = c._repr_svg_()
    assert "<svg" in svg[:400] and svg.rstrip().endswith("</svg>")
    png = c._repr_png_()
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    assert np.array_equal(png_pixels(png), c.to_array())
    assert c.to_array().shape == (320, 480, 3)
    try:
        from IPython.core.formatters import DisplayFormatter
    except ImportError:
        return
    data, _ = DisplayFormatter().format(c)
    assert "image/svg+xml" in data and "image/png" in data


def test_chart_refusals():
    scene = lamella.Scene.load(TEAL)
    with pytest.raises(lamella.SceneError, match="kind"):
        lamella.chart(scene, kind="pie")
    with pytest.raises(lamella.SceneError, match="size"):
        lamella.chart(scene, size=(10, 10))
    with pytest.raises(lamella.SceneError, match="compare"):
        lamella.chart(scene, kind="map", compare=[scene])
    with pytest.raises(lamella.SceneError, match="extension"):
        lamella.chart(scene, size=(400, 400)).save("/tmp/chart.gif")


def test_render_is_the_cli_render(cli, tmp_path):
    out = tmp_path / "r.png"
    run = cli("render", TEAL, "--size", "96x64", "--shape", "bottle", "--ssaa", "1", "-o", out)
    assert run.code == 0, run.stderr
    img = lamella.render(lamella.Scene.load(TEAL), shape="bottle", size=(96, 64), ssaa=1)
    assert img.dtype == np.uint8 and img.shape == (64, 96, 3)
    assert np.array_equal(img, png_pixels(out.read_bytes()))
    frames = lamella.render(lamella.Scene.load(SCENES / "preview_flip.json"), size=(40, 40), turntable=3)
    assert frames.shape == (3, 40, 40, 3)
    with pytest.raises(lamella.SceneError, match="ssaa"):
        lamella.render(lamella.Scene.load(TEAL), ssaa=9)


def test_render_in_an_environment_is_the_cli_render(cli, tmp_path):
    out = tmp_path / "studio.png"
    flags = ["--size", "64x48", "--ssaa", "1", "--environment", "studio", "--floor", "0.5"]
    run = cli("render", TEAL, *flags, "--caption", "-o", out)
    assert run.code == 0, run.stderr
    scene = lamella.Scene.load(TEAL)
    img = lamella.render(scene, size=(64, 48), ssaa=1, environment="studio", floor=0.5, caption=True)
    assert np.array_equal(img, png_pixels(out.read_bytes()))
    # An image of the white is the uniform environment.
    white = np.ones((8, 16, 3), dtype=np.float32)
    a = lamella.render(scene, size=(32, 32), ssaa=1, environment=white, tone=False)
    b = lamella.render(scene, size=(32, 32), ssaa=1, environment="uniform", tone=False)
    assert np.abs(a.astype(int) - b.astype(int)).max() <= 1
    clear = lamella.render(scene, size=(32, 32), environment="lighttable", view="transmit")
    assert clear.shape == (32, 32, 3)
    with pytest.raises(lamella.SceneError, match="floor"):
        lamella.render(scene, floor=0.5)
    with pytest.raises(lamella.SceneError, match="environment"):
        lamella.render(scene, environment="garden")
