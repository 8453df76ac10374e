"""Writes lifting-yoke.dxf: the cross-section of a U-shaped steel yoke for
the example case dxf-lifting-yoke.toml, as a CAD program would export it
(ASCII DXF, millimetres in $INSUNITS, LINE and ARC entities in no particular
order or direction, a CIRCLE for the bolt hole, a dimension line on a layer
of its own). No library: the format is group-code and value lines.

Run from this folder: python3 make_lifting_yoke.py
"""


R = 4.0  # outer corner fillet radius, mm


def line(handle, layer, a, b):
    return f"0\nLINE\n5\n{handle}\n8\n{layer}\n10\n{a[0]}\n20\n{a[1]}\n11\n{b[0]}\n21\n{b[1]}\n"


def arc(handle, layer, c, r, start_deg, end_deg):
    return f"0\nARC\n5\n{handle}\n8\n{layer}\n10\n{c[0]}\n20\n{c[1]}\n40\n{r}\n50\n{start_deg}\n51\n{end_deg}\n"


def circle(handle, layer, c, r):
    return f"0\nCIRCLE\n5\n{handle}\n8\n{layer}\n10\n{c[0]}\n20\n{c[1]}\n40\n{r}\n"


yoke = [
    line("10", "YOKE", (-30, 0), (-10, 0)),
    line("11", "YOKE", (-10, 20), (-10, 0)),  # drawn downwards
    line("12", "YOKE", (-10, 20), (10, 20)),
    line("13", "YOKE", (10, 20), (10, 0)),
    line("14", "YOKE", (10, 0), (30, 0)),
    line("15", "YOKE", (30, 0), (30, 30 - R)),
    arc("16", "YOKE", (30 - R, 30 - R), R, 0, 90),
    line("17", "YOKE", (30 - R, 30), (-30 + R, 30)),
    arc("18", "YOKE", (-30 + R, 30 - R), R, 90, 180),
    line("19", "YOKE", (-30, 0), (-30, 30 - R)),
    circle("1A", "YOKE", (0, 25), 3),
    line("20", "DIMENSIONS", (-30, 40), (30, 40)),
]
# A CAD export lists entities in the order they were drawn, not around the outline.
order = [3, 0, 9, 6, 1, 11, 4, 8, 2, 10, 5, 7]
body = "".join(yoke[i] for i in order)
text = (
    "0\nSECTION\n2\nHEADER\n9\n$INSUNITS\n70\n4\n0\nENDSEC\n"
    f"0\nSECTION\n2\nENTITIES\n{body}0\nENDSEC\n0\nEOF\n"
)
with open("lifting-yoke.dxf", "w", newline="\r\n") as f:
    f.write(text)
print("wrote lifting-yoke.dxf,", len(order), "entities")
