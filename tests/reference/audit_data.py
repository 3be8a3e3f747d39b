#!/usr/bin/env python3
"""Audit of offgas's data tables (data/*.yaml) against outside references.

What it checks (see tests/reference/AUDIT.md):

  a. pKa: every protonation step of data/species.yaml whose reaction also stands in one of
     PHREEQC's standard databases (phreeqc.dat, llnl.dat, minteq.v4.dat, as shipped with the
     `phreeqc` Python package; sit.dat for EDTA only) is compared with the database's pKa
     at 25 degC, from the analytical expression where the database gives one. The database
     species are mapped to offgas species by hand (PKA_MAP below). A difference above
     0.15 fails unless that step's note in DATABASE-NOTES.md (or in data/species.yaml) names
     the database file (so the note was written about this very comparison) -- then it is
     "explained". Ionization enthalpies are
     compared where the database has them (report only).
  b. Molar masses: every substance's molar_mass is recomputed from its formula with `molmass`
     (IUPAC standard atomic weights) and must agree to 0.01 g/mol; so must every species'
     molar_mass in data/species.yaml (abbreviated formulas are expanded by ABBREVIATIONS).
  c. CAS numbers: every check digit; and, where the `chemicals` package knows the substance
     by name or synonym (or knows our CAS number), that the numbers agree. Legitimate
     differences are in CAS_ALLOW with the reason.
  d. Sources: every pKa, ionization enthalpy, Henry's law constant, exposure level and every
     {value, source} pair in data/ carries a non-empty source; every source that says
     `memory` is listed so it can be confirmed.

Usage (from the repository root, with the reference venv):
    python tests/reference/audit_data.py           # writes tests/reference/audit.json
    python tests/reference/audit_data.py --check   # recompute; exit 1 on any failure or
                                                   # if audit.json is out of date
"""

import argparse
import hashlib
import importlib.metadata
import importlib.util
import json
import math
import re
import sys
from pathlib import Path

import yaml

ROOT = Path(__file__).resolve().parents[2]
DATA = ROOT / "data"
OUT = Path(__file__).resolve().parent / "audit.json"

PKA_TOL = 0.15          # pKa units
MASS_TOL = 0.01         # g/mol
T25 = 298.15            # K
R_KJ = 8.314462618e-3   # kJ/(mol K)
DATABASES = ["phreeqc.dat", "llnl.dat", "minteq.v4.dat", "sit.dat"]
# sit.dat is used only for EDTA, whose critical I = 0 constants (NEA review, Hummel et al.
# 2005) none of the three general databases carries.

# --------------------------------------------------------------------------------------
# a. Hand map: (offgas family id, step index) -> {database: (acid species, base species)}.
# The step is  acid = base + H+ (+ n H2O); the script checks that the database species
# balance that way, so a wrong pairing stops the audit instead of giving a silly number.
# --------------------------------------------------------------------------------------
ALL3 = ["phreeqc.dat", "llnl.dat", "minteq.v4.dat"]
PKA_MAP = {
    ("water", 0): {db: ("H2O", "OH-") for db in ALL3},
    # phreeqc.dat and llnl.dat carry HCl(aq) as an activity-fitting ion pair, not as the
    # thermodynamic molecular acid (see the step note in data/species.yaml).
    ("chloride", 0): {"phreeqc.dat": ("HCl", "Cl-"), "llnl.dat": ("HCl", "Cl-")},
    ("nitrate", 0): {"llnl.dat": ("HNO3", "NO3-")},
    ("sulfate", 0): {db: ("HSO4-", "SO4-2") for db in ALL3},
    ("cyanide", 0): {"llnl.dat": ("HCyanide", "Cyanide-"),
                     "minteq.v4.dat": ("HCyanide", "Cyanide-")},
    ("sulfide", 0): {db: ("H2S", "HS-") for db in ALL3},
    ("sulfide", 1): {db: ("HS-", "S-2") for db in ALL3},
    ("ammonia", 0): {db: ("NH4+", "NH3") for db in ALL3},
    ("carbonate", 0): {"phreeqc.dat": ("CO2", "HCO3-"), "llnl.dat": ("CO2", "HCO3-"),
                       "minteq.v4.dat": ("H2CO3", "HCO3-")},
    ("carbonate", 1): {db: ("HCO3-", "CO3-2") for db in ALL3},
    # llnl.dat carries dissolved SO2 twice (SO2 and H2SO3); offgas's SO2 is the SO2 entry.
    ("sulfite", 0): {"llnl.dat": ("SO2", "HSO3-")},
    ("sulfite", 1): {"llnl.dat": ("HSO3-", "SO3-2")},
    ("fluoride", 0): {db: ("HF", "F-") for db in ALL3},
    ("nitrite", 0): {"llnl.dat": ("HNO2", "NO2-")},
    ("azide", 0): {"llnl.dat": ("HN3", "N3-")},
    ("hypochlorite", 0): {"llnl.dat": ("HClO", "ClO-")},
    ("chlorite", 0): {"llnl.dat": ("HClO2", "ClO2-")},
    ("selenide", 0): {"llnl.dat": ("H2Se", "HSe-"), "minteq.v4.dat": ("H2Se", "HSe-")},
    ("selenide", 1): {"llnl.dat": ("HSe-", "Se-2"), "minteq.v4.dat": ("HSe-", "Se-2")},
    ("selenite", 0): {"llnl.dat": ("H2SeO3", "HSeO3-"),
                      "minteq.v4.dat": ("H2SeO3", "HSeO3-")},
    ("selenite", 1): {"llnl.dat": ("HSeO3-", "SeO3-2"),
                      "minteq.v4.dat": ("HSeO3-", "SeO3-2")},
    ("phosphate", 0): {db: ("H3PO4", "H2PO4-") for db in ALL3},
    ("phosphate", 1): {db: ("H2PO4-", "HPO4-2") for db in ALL3},
    ("phosphate", 2): {db: ("HPO4-2", "PO4-3") for db in ALL3},
    # B(OH)4- = H2BO3- + H2O = BO2- + 2 H2O: the same step written three ways.
    ("borate", 0): {"phreeqc.dat": ("H3BO3", "H2BO3-"), "llnl.dat": ("B(OH)3", "BO2-"),
                    "minteq.v4.dat": ("H3BO3", "H2BO3-")},
    # llnl.dat writes silicic acid as SiO2(aq) and H3SiO4- as HSiO3- (+ H2O).
    ("silicate", 0): {"phreeqc.dat": ("H4SiO4", "H3SiO4-"), "llnl.dat": ("SiO2", "HSiO3-"),
                      "minteq.v4.dat": ("H4SiO4", "H3SiO4-")},
    ("silicate", 1): {"phreeqc.dat": ("H3SiO4-", "H2SiO4-2"),
                      "llnl.dat": ("HSiO3-", "H2SiO4-2"),
                      "minteq.v4.dat": ("H3SiO4-", "H2SiO4-2")},
    ("chromate", 0): {"llnl.dat": ("H2CrO4", "HCrO4-"),
                      "minteq.v4.dat": ("H2CrO4", "HCrO4-")},
    ("chromate", 1): {"llnl.dat": ("HCrO4-", "CrO4-2"),
                      "minteq.v4.dat": ("HCrO4-", "CrO4-2")},
    ("arsenate", 0): {"llnl.dat": ("H3AsO4", "H2AsO4-"),
                      "minteq.v4.dat": ("H3AsO4", "H2AsO4-")},
    ("arsenate", 1): {"llnl.dat": ("H2AsO4-", "HAsO4-2"),
                      "minteq.v4.dat": ("H2AsO4-", "HAsO4-2")},
    ("arsenate", 2): {"llnl.dat": ("HAsO4-2", "AsO4-3"),
                      "minteq.v4.dat": ("HAsO4-2", "AsO4-3")},
    ("arsenite", 0): {"llnl.dat": ("As(OH)3", "H2AsO3-"),
                      "minteq.v4.dat": ("H3AsO3", "H2AsO3-")},
    ("thiosulfate", 1): {"llnl.dat": ("HS2O3-", "S2O3-2")},
    ("acetate", 0): {"llnl.dat": ("HAcetate", "Acetate-"),
                     "minteq.v4.dat": ("H(Acetate)", "Acetate-")},
    ("formate", 0): {"minteq.v4.dat": ("H(Formate)", "Formate-")},
    ("propionate", 0): {"minteq.v4.dat": ("H(Propionate)", "Propionate-")},
    ("butyrate", 0): {"minteq.v4.dat": ("H(Butyrate)", "Butyrate-")},
    ("benzoate", 0): {"minteq.v4.dat": ("H(Benzoate)", "Benzoate-")},
    # minteq.v4's Salicylate-2 has lost the phenolic proton too; offgas models only the
    # carboxyl step, which is H2(Salicylate) = H(Salicylate)- + H+.
    ("salicylate", 0): {"minteq.v4.dat": ("H2(Salicylate)", "H(Salicylate)-")},
    ("citrate", 0): {"minteq.v4.dat": ("H3(Citrate)", "H2(Citrate)-")},
    ("citrate", 1): {"minteq.v4.dat": ("H2(Citrate)-", "H(Citrate)-2")},
    ("citrate", 2): {"minteq.v4.dat": ("H(Citrate)-2", "Citrate-3")},
    ("tartrate", 0): {"minteq.v4.dat": ("H2(Tartarate)", "H(Tartarate)-")},
    ("tartrate", 1): {"minteq.v4.dat": ("H(Tartarate)-", "Tartarate-2")},
    ("phthalate", 0): {"llnl.dat": ("H2O_phthalate", "H(O_phthalate)-"),
                       "minteq.v4.dat": ("H2(Phthalate)", "H(Phthalate)-")},
    ("phthalate", 1): {"llnl.dat": ("H(O_phthalate)-", "O_phthalate-2"),
                       "minteq.v4.dat": ("H(Phthalate)-", "Phthalate-2")},
    ("methylamine", 0): {"minteq.v4.dat": ("H(Methylamine)+", "Methylamine")},
    ("dimethylamine", 0): {"minteq.v4.dat": ("H(Dimethylamine)+", "Dimethylamine")},
    ("trimethylamine", 0): {"minteq.v4.dat": ("H(Trimethylamine)+", "Trimethylamine")},
    ("diethylamine", 0): {"minteq.v4.dat": ("H(Diethylamine)+", "Diethylamine")},
    ("butylamine", 0): {"minteq.v4.dat": ("H(Butylamine)+", "Butylamine")},
    ("ethylenediamine", 0): {"minteq.v4.dat": ("H2(Ethylenediamine)+2",
                                               "H(Ethylenediamine)+")},
    ("ethylenediamine", 1): {"minteq.v4.dat": ("H(Ethylenediamine)+", "Ethylenediamine")},
    ("glycine", 0): {"minteq.v4.dat": ("H2(Glycine)+", "H(Glycine)")},
    ("glycine", 1): {"minteq.v4.dat": ("H(Glycine)", "Glycine-")},
    # offgas steps: 0 H6Y+2/H5Y+, 1 H5Y+/H4Y, ..., 5 HY-3/Y-4; minteq.v4 has no H6(Edta)+2.
    ("edta", 0): {"sit.dat": ("H6(Edta)+2", "H5(Edta)+")},
    ("edta", 1): {"minteq.v4.dat": ("H5(Edta)+", "H4(Edta)"),
                  "sit.dat": ("H5(Edta)+", "H4(Edta)")},
    ("edta", 2): {"minteq.v4.dat": ("H4(Edta)", "H3(Edta)-"),
                  "sit.dat": ("H4(Edta)", "H3(Edta)-")},
    ("edta", 3): {"minteq.v4.dat": ("H3(Edta)-", "H2(Edta)-2"),
                  "sit.dat": ("H3(Edta)-", "H2(Edta)-2")},
    ("edta", 4): {"minteq.v4.dat": ("H2(Edta)-2", "H(Edta)-3"),
                  "sit.dat": ("H2(Edta)-2", "H(Edta)-3")},
    ("edta", 5): {"minteq.v4.dat": ("H(Edta)-3", "Edta-4"),
                  "sit.dat": ("H(Edta)-3", "Edta-4")},
    # metal aquo ions: M+n + H2O = MOH + H+
    ("aluminium", 0): {db: ("Al+3", "AlOH+2") for db in ALL3},
    ("iron3", 0): {db: ("Fe+3", "FeOH+2") for db in ALL3},
    ("iron2", 0): {db: ("Fe+2", "FeOH+") for db in ALL3},
    ("chromium3", 0): {"llnl.dat": ("Cr+3", "CrOH+2"), "minteq.v4.dat": ("Cr+3", "Cr(OH)+2")},
    ("copper2", 0): {db: ("Cu+2", "CuOH+") for db in ALL3},
    ("zinc", 0): {db: ("Zn+2", "ZnOH+") for db in ALL3},
    ("nickel", 0): {"minteq.v4.dat": ("Ni+2", "NiOH+")},
    ("lead", 0): {db: ("Pb+2", "PbOH+") for db in ALL3},
    ("cadmium", 0): {db: ("Cd+2", "CdOH+") for db in ALL3},
    ("mercury2", 0): {"minteq.v4.dat": ("Hg+2", "HgOH+")},
}

# --------------------------------------------------------------------------------------
# b. Species formulas that are abbreviations: expanded to a real formula for molmass.
# Each expansion is the one the family's own `note` in data/species.yaml defines.
# --------------------------------------------------------------------------------------
ABBREVIATIONS = {
    # family note "Cit = C6H5O7 (citrate trianion); H3Cit = C6H8O7"
    "H3Cit": "C6H8O7", "H2Cit-": "C6H7O7", "HCit^2-": "C6H6O7", "Cit^3-": "C6H5O7",
    # family note "HGly = C2H5NO2 (zwitterion H3N+CH2COO-)"
    "H2Gly+": "C2H6NO2", "HGly": "C2H5NO2", "Gly-": "C2H4NO2",
    # family note "Y = C10H12N2O8 (EDTA tetraanion)"
    "H6Y^2+": "C10H18N2O8", "H5Y+": "C10H17N2O8", "H4Y": "C10H16N2O8",
    "H3Y-": "C10H15N2O8", "H2Y^2-": "C10H14N2O8", "HY^3-": "C10H13N2O8", "Y^4-": "C10H12N2O8",
    # family note "Tris = C4H11NO3 (H2NC(CH2OH)3)"
    "TrisH+": "C4H12NO3", "Tris": "C4H11NO3",
    # family note "en = C2H8N2 (ethylenediamine)"
    "H2en^2+": "C2H10N2", "Hen+": "C2H9N2", "en": "C2H8N2",
}
# Species formulas that cannot be checked at all (none at present), with the reason.
SPECIES_MASS_SKIP = {}

# --------------------------------------------------------------------------------------
# c. CAS numbers that differ from what `chemicals` gives, with the reason the difference
# is legitimate. Key: substance name in data/substances.yaml.
# --------------------------------------------------------------------------------------
CAS_ALLOW = {
    "disodium edta dihydrate":
        "6381-92-6 is the dihydrate of the disodium salt (reagent specification sheet for "
        "EDTA disodium salt 2-hydrate, read); chemicals files this number under edetic acid "
        "(the parent acid, 60-00-4), and its name lookup returns the parent acid's number",
    "disodium succinate hexahydrate":
        "6106-21-4 is the hexahydrate's own number (Japanese MHLW/NIHS toxicity test summary "
        "for disodium succinate hexahydrate, read); chemicals knows only the anhydrous salt "
        "(150-90-3)",
    "potassium alum":
        "the entry is the dodecahydrate KAl(SO4)2.12H2O, whose number is 7784-24-9; chemicals "
        "names 7784-24-9 'aluminum potassium sulfate dodecahydrate' but stores a garbled "
        "formula, and its name lookup returns the anhydrous salt (10043-67-1)",
    "sodium perborate tetrahydrate":
        "10486-00-7 is the tetrahydrate's own number (supplier identifier listings read: "
        "7632-04-4 anhydrous, 10332-33-9 monohydrate, 10486-00-7 tetrahydrate); chemicals "
        "knows only 7632-04-4",
    "sodium hypophosphite monohydrate":
        "10039-56-2 is the monohydrate; chemicals files it under a Czech name for sodium "
        "hypophosphite with the formula H2NaO3P (another unit), and its name lookup returns "
        "the anhydrous salt (7681-53-0)",
    "calcium carbide":
        "75-20-7 is calcium carbide (International Chemical Safety Card ICSC 0406, read); "
        "chemicals' identifier table files 75-20-7 under an unrelated organic acetate, an "
        "error in that table",
    "xylene":
        "1330-20-7 is xylene, mixed isomers, the commercial solvent (NOAA CAMEO Chemicals "
        "page 'Xylene, [mixed isomers]', read); chemicals' name lookup returns the single "
        "isomers o-xylene (95-47-6) and m-xylene (108-38-3)",
    "ammonia solution, concentrated":
        "the solution has its own number, 1336-21-6 (ammonium hydroxide; chemicals names "
        "1336-21-6 'ammonium hydroxide'), not the solute ammonia's 7664-41-7",
    "ammonia solution 25%":
        "the solution has its own number, 1336-21-6 (ammonium hydroxide; chemicals names "
        "1336-21-6 'ammonium hydroxide'), not the solute ammonia's 7664-41-7",
}

# Name spellings that `chemicals` knows under its (US) spelling.
SPELLINGS = [("aluminium", "aluminum"), ("sulphate", "sulfate"), ("sulphide", "sulfide")]


# ======================================================================================
# PHREEQC database reader (SOLUTION_SPECIES only)
# ======================================================================================
_KEYWORD = re.compile(r"^[A-Z][A-Z0-9_]{3,}$")


def charge_of(sp):
    if sp == "e-":
        return -1
    m = re.search(r"([+-])(\d+)$", sp)
    if m:
        return int(m.group(2)) * (1 if m.group(1) == "+" else -1)
    m = re.search(r"(\++|-+)$", sp)
    if m:
        return len(m.group(1)) * (1 if m.group(1)[0] == "+" else -1)
    return 0


def _parse_side(s):
    """Terms (coefficient, species) of one side; ' - X' (as sit.dat writes 'Am+3 - e-')
    gives X a negative coefficient."""
    terms, coef, sign = [], None, 1.0
    for tok in s.split():
        if tok == "+":
            continue
        if tok == "-":
            sign = -1.0
            continue
        m = re.fullmatch(r"\+?(\d+\.?\d*|\.\d+)", tok)
        if m:
            coef = float(m.group(1))
            continue
        m = re.fullmatch(r"(\d+\.?\d*)([A-Za-z(].*)", tok)
        if m:
            terms.append((sign * float(m.group(1)), m.group(2)))
        else:
            terms.append((sign * (coef if coef is not None else 1.0), tok))
        coef, sign = None, 1.0
    return terms


def parse_database(path):
    """Reactions of the SOLUTION_SPECIES blocks, keyed by the species each defines (the
    first species on the right-hand side, as in PHREEQC). A later definition replaces an
    earlier one, as PHREEQC does."""
    species, cur, in_block = {}, None, False
    for raw in path.read_text(encoding="latin-1").splitlines():
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        first = line.split()[0]
        if "=" not in line and _KEYWORD.match(first):
            in_block, cur = first == "SOLUTION_SPECIES", None
            continue
        if not in_block:
            continue
        for part in (p.strip() for p in line.split(";")):
            if not part:
                continue
            if "=" in part and not part.startswith("-"):
                lhs, rhs = part.split("=", 1)
                left, right = _parse_side(lhs), _parse_side(rhs)
                q = sum(c * charge_of(s) for c, s in left) - sum(c * charge_of(s) for c, s in right)
                if abs(q) > 1e-9:
                    raise ValueError(f"{path.name}: charge imbalance in '{part}'")
                cur = {"lhs": left, "rhs": right, "text": " ".join(part.split()),
                       "log_k": None, "delta_h": None, "analytic": None}
                species[right[0][1]] = cur
                continue
            if cur is None:
                continue
            toks = part.split()
            opt = toks[0].lstrip("-").lower()
            if opt in ("log_k", "logk"):
                cur["log_k"] = float(toks[1])
            elif opt in ("delta_h", "deltah"):
                v = float(toks[1])
                unit = toks[2].lower() if len(toks) > 2 else "kj/mol"  # PHREEQC default
                if unit.startswith("kcal"):
                    v *= 4.184
                elif unit.startswith("cal"):
                    v *= 4.184e-3
                elif unit.startswith("j"):
                    v *= 1e-3
                # llnl.dat writes 0 with "Not possible to calculate" where it has no value
                cur["delta_h"] = None if "Not possible to calculate" in raw else v
            elif opt in ("analytic", "analytical_expression", "a_e", "analytical"):
                a = [float(x) for x in toks[1:]]
                cur["analytic"] = a + [0.0] * (6 - len(a))
    return species


def _analytic(a, t):
    return a[0] + a[1] * t + a[2] / t + a[3] * math.log10(t) + a[4] / t ** 2 + a[5] * t ** 2


def _rxn_logk(r):
    # PHREEQC uses the analytical expression where one is given, log_k otherwise
    if r["analytic"] is not None:
        return _analytic(r["analytic"], T25), "analytic"
    return (r["log_k"] or 0.0), "log_k"


def _rxn_dh(r):
    if r["delta_h"] is not None:
        return r["delta_h"]
    if r["analytic"] is not None and any(r["analytic"][1:]):
        # van 't Hoff from the analytical expression (a constant-only one carries no dH)
        h = 1e-3
        d = (_analytic(r["analytic"], T25 + h) - _analytic(r["analytic"], T25 - h)) / (2 * h)
        return R_KJ * T25 ** 2 * math.log(10) * d
    return None


def formation(db, name, stack=()):
    """(vector over master species, log K, dH or None, bases) of forming `name`."""
    r = db[name]
    if len(r["lhs"]) == 1 and len(r["rhs"]) == 1 and r["lhs"][0][1] == r["rhs"][0][1]:
        return {name: 1.0}, 0.0, 0.0, set()
    if name in stack:
        raise ValueError(f"reaction cycle at {name}")
    c_s = r["rhs"][0][0]
    logk, basis = _rxn_logk(r)
    dh = _rxn_dh(r)
    bases, vec = {basis}, {}
    for c, sp in [(c, s) for c, s in r["lhs"]] + [(-c, s) for c, s in r["rhs"][1:]]:
        v2, lk2, dh2, b2 = formation(db, sp, stack + (name,))
        bases |= b2
        logk += c * lk2
        dh = None if (dh is None or dh2 is None) else dh + c * dh2
        for k, x in v2.items():
            vec[k] = vec.get(k, 0.0) + c * x
    vec = {k: x / c_s for k, x in vec.items() if abs(x) > 1e-12}
    return vec, logk / c_s, (None if dh is None else dh / c_s), bases


def database_step(db, dbname, acid, base):
    """pKa (25 degC) and ionization enthalpy of acid = base + H+ (+ n H2O)."""
    va, lka, dha, ba = formation(db, acid)
    vb, lkb, dhb, bb = formation(db, base)
    rest = dict(va)
    for k, x in vb.items():
        rest[k] = rest.get(k, 0.0) - x
    rest["H+"] = rest.get("H+", 0.0) - 1.0
    bad = {k: x for k, x in rest.items() if abs(x) > 1e-9 and k != "H2O"}
    if bad:
        raise ValueError(f"{dbname}: {acid} != {base} + H+ (+ H2O); left over {bad}")
    pka = lka - lkb           # log a(H+) = log a(H2O) = 0 for the masters' formation
    dh = None if (dha is None or dhb is None) else dhb - dha
    return pka, dh, "analytic" if "analytic" in (ba | bb) else "log_k"


# ======================================================================================
# helpers
# ======================================================================================
def load(name):
    with open(DATA / name, encoding="utf-8") as f:
        return yaml.safe_load(f)


def r4(x):
    return None if x is None else round(float(x) + 0.0, 4)


def tool_versions(dbdir):
    v = {"python": f"{sys.version_info.major}.{sys.version_info.minor}"}
    for pkg in ("phreeqc", "molmass", "chemicals", "PyYAML"):
        v[pkg] = importlib.metadata.version(pkg)
    v["databases_sha256"] = {
        n: hashlib.sha256((dbdir / n).read_bytes()).hexdigest() for n in DATABASES}
    return v


def database_dir():
    spec = importlib.util.find_spec("phreeqc")
    if spec is None:
        sys.exit("the `phreeqc` package is not installed (see tests/reference/requirements.txt)")
    return Path(list(spec.submodule_search_locations)[0]) / "databases"


# ======================================================================================
# a. pKa
# ======================================================================================
def read_database_notes():
    """(family, step) -> the notes of DATABASE-NOTES.md about that step."""
    notes = {}
    path = Path(__file__).resolve().parent / "DATABASE-NOTES.md"
    for line in path.read_text(encoding="utf-8").splitlines():
        m = re.match(r"\* `([a-z0-9_]+)` step (\d+) \([a-z_]+\): (.*)$", line)
        if m:
            notes.setdefault((m.group(1), int(m.group(2))), []).append(m.group(3))
    return notes


DATABASE_NOTES = read_database_notes()


def audit_pka(species_doc, dbdir):
    dbs = {n: parse_database(dbdir / n) for n in DATABASES}
    fams = {f["id"]: f for f in species_doc["families"]}
    for (fid, i) in PKA_MAP:
        if fid not in fams or i >= len(fams[fid]["steps"]):
            raise SystemExit(f"PKA_MAP names {fid} step {i}, which data/species.yaml lacks")
    compared, uncovered = [], []
    for fam in species_doc["families"]:
        fid = fam["id"]
        for i, st in enumerate(fam["steps"]):
            acid = fam["species"][i]["formula"]
            base = fam["species"][i + 1]["formula"]
            mapping = PKA_MAP.get((fid, i))
            if not mapping:
                uncovered.append({"family": fid, "step": i, "acid": acid, "base": base})
                continue
            note = " ".join([str(st.get("note") or "")] + DATABASE_NOTES.get((fid, i), []))
            for dbname in sorted(mapping):
                dacid, dbase = mapping[dbname]
                pka, dh, basis = database_step(dbs[dbname], dbname, dacid, dbase)
                diff = round(float(st["pka"]) - pka, 3)
                if abs(diff) <= PKA_TOL:
                    status = "ok"
                elif dbname in note:
                    status = "explained"
                else:
                    status = "fail"
                row = {
                    "family": fid, "step": i, "acid": acid, "base": base,
                    "offgas_pka": float(st["pka"]),
                    "database": dbname, "db_acid": dacid, "db_base": dbase,
                    "db_pka": r4(pka), "db_pka_basis": basis,
                    "difference": diff, "status": status,
                    "offgas_dh": r4(st.get("dh")),
                    "db_dh": r4(dh),
                    "dh_difference": None if dh is None or st.get("dh") is None
                    else round(float(st["dh"]) - dh, 2),
                }
                if status == "explained":
                    row["note"] = note
                compared.append(row)
    counts = {s: sum(1 for r in compared if r["status"] == s) for s in ("ok", "explained", "fail")}
    counts["comparisons"] = len(compared)
    counts["steps_compared"] = len({(r["family"], r["step"]) for r in compared})
    counts["steps_not_in_databases"] = len(uncovered)
    counts["steps_total"] = counts["steps_compared"] + len(uncovered)
    return {"tolerance": PKA_TOL, "temperature_K": T25, "counts": counts,
            "compared": compared, "not_in_databases": uncovered}


# ======================================================================================
# b. molar masses
# ======================================================================================
def _molmass(formula):
    from molmass import Formula
    return Formula(formula).mass


def _strip_charge(formula):
    # offgas writes a charge after the formula, its size after a caret (CO3^2-); the
    # databases write it as a signed number (CO3-2): both are stripped.
    return re.sub(r"(\^\d+[+-]|[+-]\d*)$", "", formula)


def audit_mass(species_doc, subs):
    failures, checked_subs, skipped_subs = [], 0, []
    for s in subs:
        if s.get("state") == "solution":
            skipped_subs.append(s["name"])
            continue
        f, m = s.get("formula"), s.get("molar_mass")
        checked_subs += 1
        try:
            calc = _molmass(f)
        except Exception as e:  # noqa: BLE001 - report, do not crash
            failures.append({"file": "data/substances.yaml", "entry": s["name"], "formula": f,
                             "data": m, "molmass": None, "error": str(e)})
            continue
        if m is None or abs(float(m) - calc) > MASS_TOL:
            failures.append({"file": "data/substances.yaml", "entry": s["name"], "formula": f,
                             "data": m, "molmass": round(calc, 4),
                             "difference": None if m is None else round(float(m) - calc, 4)})
    checked_sp, expanded = 0, 0
    entries = []
    for fam in species_doc["families"]:
        entries += [(fam["id"], sp) for sp in fam["species"]]
    entries += [("strong_ions", sp) for sp in species_doc.get("strong_ions", [])]
    for owner, sp in entries:
        f = sp["formula"]
        if f in SPECIES_MASS_SKIP:
            continue
        real = ABBREVIATIONS.get(f)
        expanded += real is not None
        try:
            # mass of the neutral formula: electrons (0.00055 g/mol each) are neglected, as
            # the data file does
            calc = _molmass(real or _strip_charge(f))
        except Exception as e:  # noqa: BLE001
            failures.append({"file": "data/species.yaml", "entry": f"{owner}: {f}",
                             "formula": f, "data": sp.get("molar_mass"), "molmass": None,
                             "error": f"{e} (add it to ABBREVIATIONS or SPECIES_MASS_SKIP)"})
            continue
        checked_sp += 1
        m = sp.get("molar_mass")
        if m is None or abs(float(m) - calc) > MASS_TOL:
            failures.append({"file": "data/species.yaml", "entry": f"{owner}: {f}",
                             "formula": real or f, "data": m, "molmass": round(calc, 4),
                             "difference": None if m is None else round(float(m) - calc, 4)})
    return {
        "tolerance": MASS_TOL,
        "counts": {"substances": len(subs), "substances_checked": checked_subs,
                   "solutions_without_formula": len(skipped_subs),
                   "species_checked": checked_sp, "species_abbreviations_expanded": expanded,
                   "species_skipped": len(SPECIES_MASS_SKIP), "failures": len(failures)},
        "abbreviations": dict(sorted(ABBREVIATIONS.items())),
        "species_skipped": dict(sorted(SPECIES_MASS_SKIP.items())),
        "failures": sorted(failures, key=lambda x: (x["file"], x["entry"])),
    }


# ======================================================================================
# c. CAS
# ======================================================================================
def cas_check_digit_ok(cas):
    m = re.fullmatch(r"(\d{2,7})-(\d{2})-(\d)", cas)
    if not m:
        return False
    digits = (m.group(1) + m.group(2))[::-1]
    return sum((k + 1) * int(d) for k, d in enumerate(digits)) % 10 == int(m.group(3))


def _composition(formula):
    from molmass import Formula
    try:
        return {k: v.count for k, v in Formula(formula).composition().items()}
    except Exception:  # noqa: BLE001
        return None


def _lookup(query):
    from chemicals.identifiers import search_chemical
    try:
        return search_chemical(query)
    except Exception:  # noqa: BLE001 - unknown to chemicals
        return None


def audit_cas(subs):
    by_name = {s["name"]: s for s in subs}
    rows, counts = [], {}
    for s in subs:
        name, cas = s["name"], str(s.get("cas") or "")
        row = {"name": name, "cas": cas}
        if not cas_check_digit_ok(cas):
            row.update(status="bad_check_digit")
        elif s.get("state") == "solution":
            solute = by_name.get(s.get("solution_of"), {})
            row["solute_cas"] = str(solute.get("cas"))
            rec = _lookup(cas)
            row["chemicals_name_for_cas"] = rec.common_name if rec else None
            row.update(status="ok_as_solute" if row["solute_cas"] == cas else "mismatch")
        else:
            queries = [name] + [str(x) for x in s.get("synonyms", [])]
            for a, b in SPELLINGS:
                if a in name:
                    queries.insert(1, name.replace(a, b))
            found = {}
            for q in queries:
                rec = _lookup(q)
                if rec is not None:
                    found.setdefault(rec.CASs, q)
            rec = _lookup(cas)
            ours = _composition(s["formula"]) if s.get("formula") else None
            formula_ok = rec is not None and ours is not None and _composition(rec.formula) == ours
            if cas in found:
                row.update(status="ok_by_name", matched=found[cas])
                plain = [name] + [name.replace(a, b) for a, b in SPELLINGS if a in name]
                first = next((v for v in (_lookup(q) for q in plain) if v), None)
                if first is not None and first.CASs != cas:
                    # only a synonym gives our number: show what the plain name gives
                    row["name_gives"] = first.CASs
            elif formula_ok:
                # chemicals' record for our number has exactly our formula (a hydrate's
                # own number, an isomer the name lookup does not pick, ...)
                row.update(status="ok_by_cas_formula", chemicals_name_for_cas=rec.common_name)
                if found:
                    row["other_cas_by_name"] = {k: v for k, v in sorted(found.items())}
            elif found:
                row.update(status="mismatch",
                           chemicals_by_name={k: v for k, v in sorted(found.items())})
            elif rec is not None:
                row.update(status="mismatch")
            else:
                row.update(status="not_in_chemicals")
            if row["status"] == "mismatch" and rec is not None:
                row["chemicals_for_our_cas"] = {"name": rec.common_name, "formula": rec.formula}
        if row["status"] == "mismatch" and name in CAS_ALLOW:
            row.update(status="allowed", reason=CAS_ALLOW[name])
        rows.append(row)
        counts[row["status"]] = counts.get(row["status"], 0) + 1
    unused = sorted(set(CAS_ALLOW) - {r["name"] for r in rows if r["status"] == "allowed"})
    counts["substances"] = len(subs)
    counts["failures"] = counts.get("mismatch", 0) + counts.get("bad_check_digit", 0)
    return {
        "counts": dict(sorted(counts.items())),
        "failures": [r for r in rows if r["status"] in ("mismatch", "bad_check_digit")],
        "allowed": [r for r in rows if r["status"] == "allowed"],
        "ok_by_cas_formula": [r for r in rows if r["status"] == "ok_by_cas_formula"],
        "ok_by_synonym_only": [r for r in rows if "name_gives" in r],
        "not_in_chemicals": [{"name": r["name"], "cas": r["cas"]}
                             for r in rows if r["status"] == "not_in_chemicals"],
        "allow_list_unused": unused,
    }


# ======================================================================================
# d. sources and memory
# ======================================================================================
def _label(item):
    for k in ("id", "gas", "name", "formula"):
        if isinstance(item, dict) and k in item:
            return str(item[k])
    return None


def _walk(node, path, entry, out):
    """Yield (entry, field path, key, value, parent) for every mapping key."""
    if isinstance(node, dict):
        for k, v in node.items():
            p = f"{path}.{k}" if path else str(k)
            out.append((entry, p, k, v, node))
            _walk(v, p, entry, out)
    elif isinstance(node, list):
        for i, v in enumerate(node):
            lab = _label(v)
            if entry is None and lab is not None:
                _walk(v, "", f"{path}[{lab}]", out)
            else:
                _walk(v, f"{path}[{i}]", entry, out)


def audit_sources(docs):
    missing, memory, checked = [], [], 0

    def need(file, entry, field, value):
        nonlocal checked
        checked += 1
        if not isinstance(value, str) or not value.strip():
            missing.append({"file": file, "entry": entry, "field": field})

    sp = docs["data/species.yaml"]
    for fam in sp["families"]:
        e = f"families[{fam['id']}]"
        for i, st in enumerate(fam["steps"]):
            need("data/species.yaml", e, f"steps[{i}].pka_source", st.get("pka_source"))
            need("data/species.yaml", e, f"steps[{i}].dh_source", st.get("dh_source"))
        if fam.get("volatile"):
            need("data/species.yaml", e, "volatile.source", fam["volatile"].get("source"))
        if fam.get("kw_equation"):
            need("data/species.yaml", e, "kw_equation.source", fam["kw_equation"].get("source"))
    for g in docs["data/limits.yaml"]["gases"]:
        e = f"gases[{g['gas']}]"
        for lvl in ("idlh", "short_term", "twa"):
            v = g.get(lvl)
            if v is None:
                # a level no source gives is null; the gas must then say why in a note
                if not str(g.get("note") or "").strip():
                    checked += 1
                    missing.append({"file": "data/limits.yaml", "entry": e,
                                    "field": f"{lvl} (null without a note)"})
                continue
            need("data/limits.yaml", e, f"{lvl}.source", v.get("source"))
    # any {value: ..., source: ...} pair anywhere (densities, solubilities, ...)
    for file, doc in sorted(docs.items()):
        items = []
        _walk(doc, "", None, items)
        for entry, path, k, v, parent in items:
            if isinstance(v, dict) and "value" in v and v.get("value") is not None \
                    and not ("pka" in parent or path.endswith(("idlh", "short_term", "twa"))):
                need(file, entry or "", f"{path}.source", v.get("source"))
            if isinstance(k, str) and k.endswith("source") and isinstance(v, str) \
                    and re.search(r"\bmemory\b", v, re.I):
                memory.append({"file": file, "entry": entry or "", "field": path, "text": v})
    missing = sorted({json.dumps(m, sort_keys=True) for m in missing})
    return ({"counts": {"checked": checked, "missing": len(missing)},
             "missing": [json.loads(m) for m in missing]},
            {"count": len(memory), "entries": memory})


# ======================================================================================
def build():
    dbdir = database_dir()
    docs = {f"data/{n}": load(n) for n in
            ("species.yaml", "substances.yaml", "limits.yaml", "classes.yaml", "physical.yaml")
            if (DATA / n).exists()}
    species_doc = docs["data/species.yaml"]
    subs = docs["data/substances.yaml"]["substances"]
    sources, memory = audit_sources(docs)
    return {
        "about": "Audit of data/*.yaml against PHREEQC's databases (pKa), molmass (molar "
                 "masses) and chemicals (CAS). Generated by tests/reference/audit_data.py; "
                 "do not edit by hand.",
        "tools": tool_versions(dbdir),
        "substances": sorted(s["name"] for s in subs),
        "pka": audit_pka(species_doc, dbdir),
        "molar_mass": audit_mass(species_doc, subs),
        "cas": audit_cas(subs),
        "sources": sources,
        "memory": memory,
    }


def dump(audit):
    return json.dumps(audit, indent=1, sort_keys=True, ensure_ascii=False) + "\n"


def failures_of(audit):
    out = []
    for r in audit["pka"]["compared"]:
        if r["status"] == "fail":
            out.append(f"pKa  {r['family']} step {r['step']} ({r['acid']} -> {r['base']}): "
                       f"offgas {r['offgas_pka']}, {r['database']} {r['db_pka']} "
                       f"({r['db_acid']} -> {r['db_base']}), difference {r['difference']:+.3f}")
    for r in audit["molar_mass"]["failures"]:
        out.append(f"mass {r['file']} {r['entry']} ({r['formula']}): data {r['data']}, "
                   f"molmass {r['molmass']}{' ' + r['error'] if 'error' in r else ''}")
    for r in audit["cas"]["failures"]:
        extra = {k: v for k, v in r.items() if k not in ("name", "cas", "status")}
        out.append(f"CAS  {r['name']} {r['cas']}: {r['status']} {json.dumps(extra, sort_keys=True)}")
    for r in audit["sources"]["missing"]:
        out.append(f"source missing: {r['file']} {r['entry']} {r['field']}")
    return out


def summary(audit):
    p, m, c = audit["pka"]["counts"], audit["molar_mass"]["counts"], audit["cas"]["counts"]
    lines = [
        f"pKa: {p['steps_compared']} of {p['steps_total']} steps compared "
        f"({p['comparisons']} comparisons): {p['ok']} ok, {p['explained']} explained, "
        f"{p['fail']} fail; {p['steps_not_in_databases']} steps in no database",
        f"molar mass: {m['substances_checked']} substances and {m['species_checked']} species "
        f"checked ({m['species_abbreviations_expanded']} abbreviations expanded, "
        f"{m['solutions_without_formula']} solutions take the solute's); "
        f"{m['failures']} failures",
        "CAS: " + ", ".join(f"{k} {v}" for k, v in c.items()),
        f"sources: {audit['sources']['counts']['checked']} checked, "
        f"{audit['sources']['counts']['missing']} missing",
        f"memory-marked source strings: {audit['memory']['count']}",
    ]
    if audit["cas"]["allow_list_unused"]:
        lines.append("CAS allow list entries not needed: " + ", ".join(audit["cas"]["allow_list_unused"]))
    return lines


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--check", action="store_true",
                    help="recompute; exit 1 on any failure or if audit.json is out of date")
    args = ap.parse_args()
    audit = build()
    text = dump(audit)
    for line in summary(audit):
        print(line)
    fails = failures_of(audit)
    for f in fails:
        print("FAIL " + f)
    if args.check:
        stale = not OUT.exists() or OUT.read_text(encoding="utf-8") != text
        if stale:
            print(f"FAIL {OUT.relative_to(ROOT)} is out of date: run "
                  "tests/reference/audit_data.py (without --check) and commit the result")
        sys.exit(1 if (fails or stale) else 0)
    OUT.write_text(text, encoding="utf-8")
    print(f"wrote {OUT.relative_to(ROOT)}")


if __name__ == "__main__":
    main()
