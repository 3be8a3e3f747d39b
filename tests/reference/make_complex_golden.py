#!/usr/bin/env python3
"""Outside reference for offgas's metal complexes, computed with PHREEQC and minteq.v4.dat.

Writes tests/reference/complex_golden.json: plating and etching mixtures (copper, zinc,
nickel, silver and cadmium cyanide solutions before and after acid; copper, nickel and zinc
ammine solutions with base; EDTA and citrate holding copper and nickel), each solved by
PHREEQC (through the `phreeqc` IPhreeqc bindings) with the minteq.v4.dat database as shipped,
plus, where that database lacks a complex offgas carries, that complex with offgas's constant
(listed per case under `added_species`). Each case has no headspace: the HCN and NH3 partial
pressures are those in equilibrium with the liquid, from the saturation index of a gas phase
defined with offgas's Henry's law constant (data/species.yaml), so they compare the
dissolved neutral form on one scale. The metals' hydroxides (and silver oxide) may
precipitate, as offgas lets them.

What differs between the two computations, and why the tolerances are what they are, is in
tests/reference/README.md (section "Metal complexes").

Usage:
    python tests/reference/make_complex_golden.py            # regenerate complex_golden.json
    python tests/reference/make_complex_golden.py --check    # recompute, compare with the file
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from pathlib import Path

import phreeqc
import yaml

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
GOLDEN = HERE / "complex_golden.json"
SPECIES_YAML = ROOT / "data" / "species.yaml"
COMPLEXES_YAML = ROOT / "data" / "complexes.yaml"
DATABASE = "minteq.v4.dat"
GENERATOR = "tests/reference/make_complex_golden.py"

# offgas family or strong ion -> (database element as entered in SOLUTION, database formula
# of the neutral volatile species, offgas family whose Henry's law constant defines the gas)
ELEMENTS = {
    "cyanide": "Cyanide", "ammonia": "N(-3)", "sulfate": "S(6)", "nitrate": "N(5)",
    "chloride": "Cl", "edta": "Edta", "citrate": "Citrate", "copper2": "Cu(2)", "zinc": "Zn",
    "nickel": "Ni", "cadmium": "Cd", "Cu+": "Cu(1)", "Ag+": "Ag", "Na+": "Na", "K+": "K",
}
GASES = {"HCN": ("HCyanide", "cyanide"), "NH3": ("NH3", "ammonia")}
# The hydroxide or oxide each metal may precipitate as: the database's phase with the same
# constant as offgas's `solids` (data/complexes.yaml), allowed to form (none at the start).
SOLIDS = {"copper2": "Cu(OH)2", "zinc": "Zn(OH)2(am)", "nickel": "Ni(OH)2", "cadmium": "Cd(OH)2(am)", "Ag+": "Ag2O"}

# Complexes offgas carries that minteq.v4.dat lacks, written in the database's own species
# names from offgas's constants (data/complexes.yaml), so that both sides count the same
# species: (offgas formula, database reaction, database product).
ADDED = {
    "Zn(CN)2": ("Zn+2 + 2 Cyanide- = Zn(Cyanide)2", 0),
    "Zn(CN)3-": ("Zn+2 + 3 Cyanide- = Zn(Cyanide)3-", -1),
    "Zn(CN)4^2-": ("Zn+2 + 4 Cyanide- = Zn(Cyanide)4-2", -2),
    "Cu(NH3)2^2+": ("Cu+2 + 2 NH3 = Cu(NH3)2+2", 2),
    "Cu(NH3)3^2+": ("Cu+2 + 3 NH3 = Cu(NH3)3+2", 2),
    "Cu(NH3)4^2+": ("Cu+2 + 4 NH3 = Cu(NH3)4+2", 2),
    "Ni(NH3)3^2+": ("Ni+2 + 3 NH3 = Ni(NH3)3+2", 2),
    "Ni(NH3)4^2+": ("Ni+2 + 4 NH3 = Ni(NH3)4+2", 2),
    "Ni(NH3)5^2+": ("Ni+2 + 5 NH3 = Ni(NH3)5+2", 2),
    "Ni(NH3)6^2+": ("Ni+2 + 6 NH3 = Ni(NH3)6+2", 2),
    "Zn(NH3)^2+": ("Zn+2 + NH3 = Zn(NH3)+2", 2),
    "Zn(NH3)2^2+": ("Zn+2 + 2 NH3 = Zn(NH3)2+2", 2),
    "Zn(NH3)3^2+": ("Zn+2 + 3 NH3 = Zn(NH3)3+2", 2),
    "Zn(NH3)4^2+": ("Zn+2 + 4 NH3 = Zn(NH3)4+2", 2),
}

# Concentrations in mol per litre of liquid (taken as mol/kg of water: every case is dilute).
CASES = [
    dict(id="copper_cyanide_rinse", description="Copper(I) cyanide with excess sodium cyanide (a plating rinse): 3 CN per Cu.",
         parts={"Cu+": 0.01, "cyanide": 0.03, "Na+": 0.02}),
    dict(id="copper_cyanide_rinse_acidified", description="The same rinse with sulfuric acid: Cu(CN)2- holds copper, the rest is HCN.",
         parts={"Cu+": 0.01, "cyanide": 0.03, "Na+": 0.02, "sulfate": 0.02}),
    dict(id="copper_cyanide_excess_caustic", description="Copper cyanide bath diluted, with free cyanide and caustic.",
         parts={"Cu+": 0.005, "cyanide": 0.02, "Na+": 0.035}),
    dict(id="zinc_cyanide_alkaline", description="Zinc cyanide plating rinse: Zn(CN)2 with NaCN and caustic.",
         parts={"zinc": 0.005, "cyanide": 0.02, "Na+": 0.03}),
    dict(id="zinc_cyanide_near_neutral", description="Zinc cyanide rinse partly neutralised with sulfuric acid (pH near 9).",
         parts={"zinc": 0.005, "cyanide": 0.02, "Na+": 0.01, "sulfate": 0.0045}),
    dict(id="nickel_cyanide", description="Potassium tetracyanonickelate solution.",
         parts={"nickel": 0.005, "cyanide": 0.02, "K+": 0.01}),
    dict(id="nickel_cyanide_acidified", description="Tetracyanonickelate with sulfuric acid: protonated nickel cyanide complexes.",
         parts={"nickel": 0.005, "cyanide": 0.02, "K+": 0.01, "sulfate": 0.01}),
    dict(id="silver_cyanide", description="Silver cyanide plating rinse: AgCN with KCN.",
         parts={"Ag+": 0.005, "cyanide": 0.015, "K+": 0.015}),
    dict(id="silver_cyanide_acidified", description="The silver rinse with nitric acid.",
         parts={"Ag+": 0.005, "cyanide": 0.015, "K+": 0.015, "nitrate": 0.012}),
    dict(id="cadmium_cyanide", description="Cadmium cyanide rinse with excess cyanide.",
         parts={"cadmium": 0.003, "cyanide": 0.015, "Na+": 0.015}),
    dict(id="copper_ammine", description="Copper sulfate in dilute ammonia (ammoniacal etchant rinse).",
         parts={"copper2": 0.01, "sulfate": 0.01, "ammonia": 0.1}),
    dict(id="copper_ammine_caustic", description="The ammine rinse with sodium hydroxide.",
         parts={"copper2": 0.01, "sulfate": 0.01, "ammonia": 0.1, "Na+": 0.02}),
    dict(id="nickel_ammine", description="Nickel sulfate in ammonia.",
         parts={"nickel": 0.01, "sulfate": 0.01, "ammonia": 0.2}),
    dict(id="zinc_ammine_caustic", description="Zinc chloride in ammonia with caustic.",
         parts={"zinc": 0.01, "chloride": 0.02, "ammonia": 0.1, "Na+": 0.005}),
    dict(id="copper_edta", description="Copper sulfate with disodium EDTA: the chelate frees EDTA's protons, so the mixture is acidic.",
         parts={"copper2": 0.005, "sulfate": 0.005, "edta": 0.006, "Na+": 0.012}),
    dict(id="nickel_citrate", description="Nickel sulfate with trisodium citrate (electroless nickel rinse).",
         parts={"nickel": 0.01, "sulfate": 0.01, "citrate": 0.02, "Na+": 0.06}),
]


def henry_kh_log(family: str, species: dict) -> float:
    """log10 of K = m(neutral)/p(atm) at 25 °C from offgas's Hcp (mol/(m3 Pa))."""
    for f in species["families"]:
        if f["id"] == family:
            hcp = f["volatile"]["hcp"]
            return math.log10(hcp * 101325.0 / 1000.0 / 0.997)
    raise KeyError(family)


def complex_constants() -> dict:
    data = yaml.safe_load(COMPLEXES_YAML.read_text())
    return {c["formula"]: c["log_beta"] for c in data["complexes"]}


def added_definitions(betas: dict) -> str:
    out = ["SOLUTION_SPECIES"]
    for formula, (reaction, _z) in ADDED.items():
        out.append(reaction)
        out.append(f"    log_k {betas[formula]}")
    return "\n".join(out) + "\n"


def phases(species: dict) -> str:
    out = ["PHASES"]
    for gas, (aq, family) in GASES.items():
        out.append(f"{gas}_offgas(g)")
        out.append(f"    {aq} = {aq}")
        out.append(f"    log_k {henry_kh_log(family, species):.6f}")
    return "\n".join(out) + "\n"


def solution_block(case: dict) -> str:
    lines = ["SOLUTION 1", "    units mol/kgw", "    temp 25", "    pH 7 charge"]
    for part, c in case["parts"].items():
        lines.append(f"    {ELEMENTS[part]} {c}")
    return "\n".join(lines) + "\n"


def run_case(case: dict, defs: str) -> dict:
    p = phreeqc.Phreeqc()
    if p.LoadBuiltInDatabase(DATABASE):
        raise RuntimeError(p.GetErrorString())
    # Acids and bases are entered as their anions or cations; the charge balance on pH then
    # sets how much H+ or OH- they bring, as offgas does with its families and strong ions
    # (sodium beyond its anions is sodium hydroxide, sulfate beyond its cations sulfuric acid).
    phases_block = "".join(f"    {SOLIDS[p]} 0 0\n" for p in case["parts"] if p in SOLIDS)
    if phases_block:
        phases_block = "EQUILIBRIUM_PHASES 1\n" + phases_block
    text = defs + solution_block(case) + phases_block + (
        "SELECTED_OUTPUT\n    -reset false\n    -pH true\n    -ionic_strength true\n"
        "    -molalities Cyanide- HCyanide NH3 NH4+\n"
        "    -saturation_indices HCN_offgas(g) NH3_offgas(g)\n"
        "    -totals Cyanide N(-3)\nEND\n")
    if p.RunString(text):
        raise RuntimeError(p.GetErrorString() + "\n--- input ---\n" + text)
    so = p.GetSelectedOutput()
    # The last row: after any solid has formed.
    row = {k: v[-1] for k, v in so.items()}
    atm = {}
    for gas in GASES:
        si = row.get(f"si_{gas}_offgas(g)")
        # A gas below 1e-20 atm is no gas (the reaction step lets nitrate give traces of NH3).
        if si is not None and si > -20:
            atm[gas] = 10.0 ** si
    return {
        "ph": row["pH"],
        "ionic_strength": row["mu"],
        "free_cyanide_mol_per_kg": row.get("m_Cyanide-(mol/kgw)", 0.0),
        "free_ammonia_mol_per_kg": row.get("m_NH3(mol/kgw)", 0.0),
        "gases_atm": atm,
    }


def build() -> dict:
    species = yaml.safe_load(SPECIES_YAML.read_text())
    betas = complex_constants()
    defs = added_definitions(betas) + phases(species)
    cases = []
    for case in CASES:
        needs = [f for f in ADDED if _uses(case, f)]
        cases.append({
            "id": case["id"],
            "description": case["description"],
            "parts_mol_per_l": case["parts"],
            "added_species": needs,
            "result": run_case(case, defs),
        })
    return {
        "generator": GENERATOR,
        "reference": f"PHREEQC {phreeqc.Phreeqc().GetVersionString()} (IPhreeqc through the `phreeqc` Python package) with {DATABASE} as shipped, plus the complexes in `added_species` with offgas's constants",
        "temperature_c": 25.0,
        "cases": cases,
    }


def _uses(case: dict, formula: str) -> bool:
    metal = {"Zn": "zinc", "Cu": "copper2", "Ni": "nickel"}[formula[:2]]
    ligand = "cyanide" if "CN" in formula else "ammonia"
    return metal in case["parts"] and ligand in case["parts"]


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--check", action="store_true")
    args = ap.parse_args()
    doc = build()
    text = json.dumps(doc, indent=1, sort_keys=True) + "\n"
    if args.check:
        old = json.loads(GOLDEN.read_text())
        bad = []
        for a, b in zip(old["cases"], doc["cases"]):
            for key in ("ph", "free_cyanide_mol_per_kg", "free_ammonia_mol_per_kg"):
                x, y = a["result"][key], b["result"][key]
                if abs(x - y) > 1e-6 * max(abs(x), abs(y), 1e-30):
                    bad.append(f"{a['id']}: {key} {x} vs {y}")
        if len(old["cases"]) != len(doc["cases"]):
            bad.append("the number of cases changed")
        if bad:
            print("complex_golden.json is stale (regenerate with make_complex_golden.py):\n" + "\n".join(bad))
            return 1
        print(f"complex_golden.json: {len(doc['cases'])} cases reproduced")
        return 0
    GOLDEN.write_text(text)
    print(f"wrote {GOLDEN.relative_to(ROOT)}: {len(doc['cases'])} cases")
    return 0


if __name__ == "__main__":
    sys.exit(main())
