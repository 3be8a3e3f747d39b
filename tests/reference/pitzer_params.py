"""Compare offgas's Pitzer parameters (data/pitzer.yaml) with the 25 °C values of the Pitzer
database that ships with PHREEQC (pitzer.dat, after Plummer et al. 1988 and Harvie, Møller &
Weare 1984, with later refits).

For every pair offgas carries, prints beta0, beta1, beta2 and C-phi side by side and flags a
difference beyond 2 % (or 0.002 absolute for values near zero). A difference is not by itself
an error: pitzer.dat replaces several classic single-salt fits with multi-temperature refits
(NaCl, KCl, CaCl2, Na2SO4, MgSO4), which trade a little accuracy at 25 °C for range. Exits 0;
the point is the table and its summary line.

Usage: python tests/reference/pitzer_params.py
"""
import os
import re
import sys

import yaml

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))


def database_path():
    import phreeqc  # the IPhreeqc bindings pinned in requirements.txt

    path = os.path.join(os.path.dirname(phreeqc.__file__), "databases", "pitzer.dat")
    if not os.path.exists(path):
        sys.exit(f"pitzer.dat not found beside the phreeqc package ({path})")
    return path


# Our notation (Ca^2+, SO4^2-) in the database's (Ca+2, SO4-2).
def db_name(formula):
    m = re.fullmatch(r"(.+)\^(\d)([+-])", formula)
    return f"{m.group(1)}{m.group(3)}{m.group(2)}" if m else formula


def read_database(path):
    """{(block, frozenset({ion, ion})): value at 25 °C} for the B0, B1, B2 and C0 blocks."""
    values = {}
    block = None
    for raw in open(path, encoding="latin-1"):
        line = raw.split("#")[0].strip()
        if not line:
            continue
        if line.startswith("-"):
            word = line.split()[0].upper()
            block = word[1:] if word in ("-B0", "-B1", "-B2", "-C0") else None
            continue
        if block is None:
            continue
        parts = line.split()
        if len(parts) < 3:
            continue
        try:
            value = float(parts[2])
        except ValueError:
            continue
        values[(block, frozenset(parts[:2]))] = value
    return values


def main():
    data = yaml.safe_load(open(os.path.join(ROOT, "data", "pitzer.yaml"), encoding="utf-8"))
    db = read_database(database_path())
    compared = differ = missing = 0
    print(f"{'pair':<16}{'param':<7}{'offgas':>10}{'pitzer.dat':>12}")
    for p in data["pairs"]:
        key = frozenset((db_name(p["cation"]), db_name(p["anion"])))
        name = f"{p['cation']} {p['anion']}"
        if not any((b, key) in db for b in ("B0", "B1", "B2", "C0")):
            print(f"{name:<16}(not in the database)")
            missing += 1
            continue
        for ours, block in (("beta0", "B0"), ("beta1", "B1"), ("beta2", "B2"), ("c_phi", "C0")):
            a = float(p.get(ours, 0.0))
            b = db.get((block, key), 0.0)
            compared += 1
            off = abs(a - b) > max(0.02 * abs(b), 0.002)
            differ += off
            print(f"{name:<16}{ours:<7}{a:>10.5g}{b:>12.5g}{'   differs' if off else ''}")
    print(
        f"summary: {len(data['pairs'])} pairs, {compared} values compared, {differ} differ beyond "
        f"2 % (or 0.002), {missing} pairs not in the database"
    )


if __name__ == "__main__":
    main()
