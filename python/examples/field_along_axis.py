"""Field of a sensor bias magnet along its axis, with the 0.5 mT level of
implanted devices, plotted with matplotlib (python examples/field_along_axis.py).

Strong magnets pinch and shatter, and static fields affect implanted
devices: follow local codes and the device maker's advice.
"""

import os

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt
import numpy as np

import lodestone

here = os.path.dirname(os.path.abspath(__file__))
r = lodestone.solve(os.path.join(here, "..", "..", "cases", "magnet-bare.toml"))
# mm along the axis, within the solved region (its open boundary lies
# beyond the case's farthest probe; further out field() gives NaN).
z = np.linspace(6.0, 60.0, 300)
b = r.field(np.zeros_like(z), z)
bz_mT = np.abs(b[:, 1]) * 1e3

fig, ax = plt.subplots(figsize=(6, 4))
ax.semilogy(z, bz_mT, label="|Bz| on the axis")
ax.axhline(0.5, color="tab:red", linestyle="--", label="0.5 mT (implanted devices)")
ax.set_xlabel("z (mm)")
ax.set_ylabel("|Bz| (mT)")
ax.set_title("bare N38 disk: field along the axis")
ax.legend()
fig.tight_layout()
out = os.path.join(os.getcwd(), "field_along_axis.png")
fig.savefig(out, dpi=120)
print(f"plot written to {out}; probe.front.bz = {r.values['probe.front.bz'] * 1e3:.3f} mT")
