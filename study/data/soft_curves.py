"""Writes study/src/materials/sourced_curves.rs from the sourced B-H tables.

Run by hand from the repository root when the tables change:
    python3 study/data/soft_curves.py ../shared/data > study/src/materials/sourced_curves.rs
Each curve keeps its table's points as given (H in A/m, B in T), starts at
(0, 0), and stops where the next point would rise more slowly than mu0 (the
solver extends every curve past its last point with slope mu0).
"""
import csv
import json
import math
import sys

MU0 = 4e-7 * math.pi

# (library name, CSV file, material column prefix, family, source text)
CURVES = [
    ("DC01", "bh_fitted_models_derived.csv", "\"DC01", "solid steel",
     "DC01 (1.0330) cold-rolled low-carbon sheet, the nearest sourced proxy for AISI 1008/1010: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived), mostly 50 Hz commutating curves; fitted to data up to about 2.0 T; machined parts are softer"),
    ("DC03", "bh_fitted_models_derived.csv", "DC03", "solid steel",
     "DC03 (1.0347) deep-drawing low-carbon sheet: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 2.05 T"),
    ("9SMn28k", "bh_fitted_models_derived.csv", "9SMn28k", "free-machining steel",
     "9SMn28k (1.0715) unleaded free-machining steel (about AISI 1213/1215): points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 1.95 T"),
    ("9SMnPb28", "bh_fitted_models_derived.csv", "9SMnPb28", "free-machining steel",
     "9SMnPb28 (1.0718), the material number of AISI 12L14: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 1.8 T"),
    ("X6Cr17", "bh_fitted_models_derived.csv", "X6Cr17", "ferritic stainless steel",
     "X6Cr17 (1.4016) = AISI 430 ferritic stainless: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived); fitted to data up to about 1.65 T"),
    ("RFe80", "bh_fitted_models_derived.csv", "RFe80", "solid iron",
     "RFe80 relay iron (coercivity class 80 A/m), the nearest sourced proxy for Armco-type soft iron: points evaluated from a general-purpose modelling library's fitted mu_r(B) curve (S54, SECONDARY, derived; may be too soft at high field); fitted to data up to about 2.1 T"),
    ("grey-cast-iron", "bh_cast_iron_historic.csv", None, "cast iron",
     "grey cast iron (2 % Si, 2.85 % C), measured about 1900, Table IV of the electromagnetism article of the Encyclopaedia Britannica 11th ed. (1910-11) converted from cgs (S55, SECONDARY): old material, indicative only"),
    ("M250-35A", "bh_electrical_steel_typical.csv", "M250-35A", "non-oriented electrical steel",
     "M250-35A typical 50 Hz curve, manufacturer's table (S51, SECONDARY copy): typical, not the guaranteed minimum of EN 10106"),
    ("M270-50A", "bh_electrical_steel_typical.csv", "\"M270-50A", "non-oriented electrical steel",
     "M270-50A measured 50 Hz curve, one sample set from the steel's maker (S52, SECONDARY): typical, not the guaranteed minimum of EN 10106"),
    ("M330-50A", "bh_electrical_steel_typical.csv", "\"M330-50A", "non-oriented electrical steel",
     "M330-50A typical 50 Hz curve from a manufacturer's data sheet (S53, SECONDARY; maker not named): typical, not the guaranteed minimum of EN 10106"),
    ("M400-50A", "bh_electrical_steel_typical.csv", "\"M400-50A (voestalpine", "non-oriented electrical steel",
     "M400-50A measured 50 Hz curve, one sample set from the steel's maker (S52, SECONDARY; S53 agrees within 0.015 T): typical, not the guaranteed minimum of EN 10106 (1.533 T at 2.5 kA/m, S35)"),
]


def rows(folder, file, prefix):
    with open(f"{folder}/{file}") as f:
        lines = [l for l in f if not l.startswith("#")]
    if prefix is None:
        reader = csv.DictReader(lines)
        return [(float(r["H_A_per_m"]), float(r["B_T"])) for r in reader]
    lines = [lines[0]] + [l for l in lines[1:] if l.startswith(prefix)]
    reader = csv.DictReader(lines)
    return [(float(r["H_A_per_m"]), float(r["B_T"])) for r in reader]


def clean(points):
    out = [(0.0, 0.0)]
    for h, b in sorted(points):
        ph, pb = out[-1]
        if h <= ph or b <= pb:
            continue
        if (b - pb) / (h - ph) <= MU0 * 1.001:
            break
        out.append((h, b))
    return out


def main():
    folder = sys.argv[1]
    print("//! Sourced soft-magnetic curves, written by study/data/soft_curves.py from")
    print("//! the project's material tables; do not edit by hand.")
    print()
    print("/// (name, family, points as [H A/m, B T], source)")
    print("pub const SOURCED: &[(&str, &str, &[[f64; 2]], &str)] = &[")
    for name, file, prefix, family, source in CURVES:
        pts = clean(rows(folder, file, prefix))
        body = ", ".join(f"[{h!r}, {b!r}]" for h, b in pts)
        print(f"    (\n        {json.dumps(name)},\n        {json.dumps(family)},\n        &[{body}],\n        {json.dumps(source)},\n    ),")
    print("];")


main()
