"""Write the sample drawings in sample_geometries/ (a scenario of our own, not taken from anywhere).

``busbar_fillets.dxf`` and ``busbar_fillets.svg`` draw the two busbars of
``busbar_enclosure.json`` (60 mm x 10 mm, 3 mm edge radii, 80 mm apart, in a 300 mm x 200 mm
earthed enclosure with 3 mm walls) the way a CAD user draws them: bar L1 as a closed
polyline with bulged fillets, bar L2 as a chain of separate lines and arcs, the enclosure as
an outer and an inner closed polyline, plus a note on a layer that is ignored.

``bus_on_post.dxf`` and ``bus_on_post.svg`` draw a 10 kV bus bar (40 mm x 8 mm, 2 mm edge radii)
resting on an epoxy support block (30 mm x 25 mm) on an earthed base plate (200 mm x 6 mm), on
layers BUS, EPOXY and EARTH, with a note and a leader line on layer NOTES (for the layer map of
the command line and the window's import dialog).

Run from the repository root: ``python scripts/make_sample_drawings.py``.
"""

from __future__ import annotations

import math
from pathlib import Path

import ezdxf

OUT = Path(__file__).resolve().parents[1] / "sample_geometries"
W, H, R = 10.0, 60.0, 3.0
BULGE = math.tan(math.pi / 8)


def bar_polyline(cx: float) -> list[tuple[float, float, float, float, float]]:
    x0, x1, y0, y1 = cx - W / 2, cx + W / 2, -H / 2, H / 2
    pts = [(x0 + R, y0, 0), (x1 - R, y0, BULGE), (x1, y0 + R, 0), (x1, y1 - R, BULGE),
           (x1 - R, y1, 0), (x0 + R, y1, BULGE), (x0, y1 - R, 0), (x0, y0 + R, BULGE)]
    return [(x, y, 0.0, 0.0, b) for x, y, b in pts]


def write_dxf() -> None:
    doc = ezdxf.new("R2010", units=4)  # $INSUNITS 4 = millimetres
    msp = doc.modelspace()
    for name in ("L1", "L2", "ENCLOSURE", "NOTES"):
        doc.layers.add(name)
    msp.add_lwpolyline(bar_polyline(-40.0), format="xyseb", close=True, dxfattribs={"layer": "L1"})
    cx = 40.0
    x0, x1, y0, y1 = cx - W / 2, cx + W / 2, -H / 2, H / 2
    for start, end in (((x0 + R, y0), (x1 - R, y0)), ((x1, y0 + R), (x1, y1 - R)),
                       ((x1 - R, y1), (x0 + R, y1)), ((x0, y1 - R), (x0, y0 + R))):
        msp.add_line(start, end, dxfattribs={"layer": "L2"})
    for centre, a0 in (((x1 - R, y0 + R), 270), ((x1 - R, y1 - R), 0), ((x0 + R, y1 - R), 90), ((x0 + R, y0 + R), 180)):
        msp.add_arc(centre, R, a0, a0 + 90, dxfattribs={"layer": "L2"})
    msp.add_lwpolyline([(-153, -103), (153, -103), (153, 103), (-153, 103)], close=True, dxfattribs={"layer": "ENCLOSURE"})
    msp.add_lwpolyline([(-150, -100), (150, -100), (150, 100), (-150, 100)], close=True, dxfattribs={"layer": "ENCLOSURE"})
    msp.add_text("12 kV busbars, section A-A", dxfattribs={"layer": "NOTES", "height": 5}).set_placement((-140, 110))
    doc.saveas(OUT / "busbar_fillets.dxf")


def write_svg() -> None:
    """The same drawing as SVG paths (user units are millimetres; SVG's y axis points down)."""

    def bar_path(cx: float) -> str:
        x0, x1, y0, y1 = cx - W / 2, cx + W / 2, -H / 2, H / 2
        return (f"M {x0 + R} {y0} L {x1 - R} {y0} A {R} {R} 0 0 1 {x1} {y0 + R} L {x1} {y1 - R} "
                f"A {R} {R} 0 0 1 {x1 - R} {y1} L {x0 + R} {y1} A {R} {R} 0 0 1 {x0} {y1 - R} "
                f"L {x0} {y0 + R} A {R} {R} 0 0 1 {x0 + R} {y0} Z")

    svg = f"""<svg xmlns="http://www.w3.org/2000/svg" width="320mm" height="220mm" viewBox="-160 -110 320 220">
  <g id="L1"><path d="{bar_path(-40.0)}" fill="#b5651d"/></g>
  <g id="L2"><path d="{bar_path(40.0)}" fill="#2f2f2f"/></g>
  <g id="ENCLOSURE"><path fill-rule="evenodd" fill="#6b8e23"
     d="M -153 -103 H 153 V 103 H -153 Z M -150 -100 H 150 V 100 H -150 Z"/></g>
</svg>
"""
    (OUT / "busbar_fillets.svg").write_text(svg, encoding="utf-8")


BUS_W, BUS_H, BUS_R = 40.0, 8.0, 2.0
POST_W, POST_H = 30.0, 25.0
BASE_W, BASE_H = 200.0, 6.0


def bus_outline() -> list[tuple[float, float, float]]:
    """The bus bar as (x, y, bulge): sitting on the epoxy block, top face at y = 8 + 25 + 6."""
    x0, x1 = -BUS_W / 2, BUS_W / 2
    y0 = BASE_H + POST_H
    y1 = y0 + BUS_H
    r = BUS_R
    return [(x0 + r, y0, 0), (x1 - r, y0, BULGE), (x1, y0 + r, 0), (x1, y1 - r, BULGE),
            (x1 - r, y1, 0), (x0 + r, y1, BULGE), (x0, y1 - r, 0), (x0, y0 + r, BULGE)]


def write_bus_on_post_dxf() -> None:
    doc = ezdxf.new("R2010", units=4)
    msp = doc.modelspace()
    for name in ("BUS", "EPOXY", "EARTH", "NOTES"):
        doc.layers.add(name)
    msp.add_lwpolyline([(x, y, 0.0, 0.0, b) for x, y, b in bus_outline()], format="xyseb", close=True,
                       dxfattribs={"layer": "BUS"})
    msp.add_lwpolyline([(-POST_W / 2, BASE_H), (POST_W / 2, BASE_H), (POST_W / 2, BASE_H + POST_H),
                        (-POST_W / 2, BASE_H + POST_H)], close=True, dxfattribs={"layer": "EPOXY"})
    corners = [(-BASE_W / 2, 0.0), (BASE_W / 2, 0.0), (BASE_W / 2, BASE_H), (-BASE_W / 2, BASE_H)]
    for a, b in zip(corners, corners[1:] + corners[:1]):
        msp.add_line(a, b, dxfattribs={"layer": "EARTH"})
    msp.add_text("10 kV bus on epoxy post, section B-B", dxfattribs={"layer": "NOTES", "height": 4}).set_placement((30, 60))
    msp.add_line((28, 58), (18, 42), dxfattribs={"layer": "NOTES"})
    doc.saveas(OUT / "bus_on_post.dxf")


def write_bus_on_post_svg() -> None:
    """The same drawing as SVG (user units millimetres, y down: y is written negated)."""
    pts = bus_outline()
    d = f"M {pts[0][0]} {-pts[0][1]}"
    for (_, _, b), (nx, ny, _) in zip(pts, pts[1:] + pts[:1]):
        d += f" A {BUS_R} {BUS_R} 0 0 0 {nx} {-ny}" if b else f" L {nx} {-ny}"
    svg = f"""<svg xmlns="http://www.w3.org/2000/svg" width="220mm" height="70mm" viewBox="-110 -60 220 70">
  <g id="BUS"><path d="{d} Z" fill="#b5651d"/></g>
  <g id="EPOXY"><rect x="{-POST_W / 2}" y="{-(BASE_H + POST_H)}" width="{POST_W}" height="{POST_H}" fill="#d8c97a"/></g>
  <g id="EARTH"><rect x="{-BASE_W / 2}" y="{-BASE_H}" width="{BASE_W}" height="{BASE_H}" fill="#777"/></g>
  <g id="NOTES"><text x="30" y="-60">10 kV bus on epoxy post, section B-B</text></g>
</svg>
"""
    (OUT / "bus_on_post.svg").write_text(svg, encoding="utf-8")


if __name__ == "__main__":
    write_dxf()
    write_svg()
    write_bus_on_post_dxf()
    write_bus_on_post_svg()
