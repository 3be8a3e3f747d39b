#!/usr/bin/env python3
"""Outside reference for offgas's speciation and headspace numbers, computed with PHREEQC.

Writes tests/reference/golden.json: mixtures (acid-base family totals and strong ions per
litre of liquid, a sealed headspace, a temperature), each solved twice by PHREEQC (through
the `phreeqc` IPhreeqc bindings):

* `database_result`: the case's PHREEQC database as shipped, except that every family is a
  non-reacting copy (own element name) of the database's species, so that no redox
  reaction can run (see NOTES below);
* `offgas_constants_result`: the same mixture with offgas's own constants (pKa, ionization
  enthalpies, Henry's law constants, Kw from data/species.yaml) and only the species offgas
  models, Davies activity coefficients for ions and gamma = 1 for neutral species.

Usage:
    python tests/reference/make_golden.py            # regenerate golden.json
    python tests/reference/make_golden.py --check    # recompute, compare with golden.json
"""

from __future__ import annotations

import argparse
import json
import math
import re
import sys
from collections import Counter
from pathlib import Path

import phreeqc
import yaml
from importlib.metadata import version as _pkg_version

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
GOLDEN = HERE / "golden.json"
SPECIES_YAML = ROOT / "data" / "species.yaml"
PHYSICAL_YAML = ROOT / "data" / "physical.yaml"
DBDIR = Path(phreeqc.__file__).resolve().parent / "databases"
GENERATOR = "tests/reference/make_golden.py"
PINNED_PACKAGE_VERSION = "1.1.1"  # tests/reference/requirements.txt
# The offgas-constants runs need PHREEQC's Davies branch, which llnl.dat switches off (its
# b-dot model gives gamma = 1 to every species without -llnl_gamma): they load phreeqc.dat
# as host for H2O, H+ and OH- only and replace those constants too.
OFFGAS_HOST_DB = "phreeqc.dat"

# Materiality thresholds (see NOTES).
SHARE_MATERIAL = 0.01  # a species offgas lacks (or the database lacks) holding >1 % of a family
GAS_MOLES_MATERIAL = 1e-3  # a gas one side lacks that holds >0.1 % of its family
STEP_IN_PLAY = 1e-3  # both species of a protonation step hold >=0.1 % of the family
TOL_LOGK = 0.02  # pKa, log10 Hcp and pKw differences beyond this are named
KW_IN_PLAY_PH = 5.0  # a pKw difference is material only where either run's pH is above this

# --------------------------------------------------------------------------------------
# Families: the element copies (own element names, never present in any database) and
# the species offgas models, in offgas's order (most protonated first). The same copy
# element name is used in the database runs (with the database's formulas) and in the
# offgas-constants runs (with the canonical formulas below).
# --------------------------------------------------------------------------------------
COPIES = {
    # family: copy element, canonical formulas in offgas order, canonical gas formula
    "carbonate": {"elem": "Cbn", "species": ["CbnO2", "HCbnO3-", "CbnO3-2"], "gas": "CbnO2"},
    "sulfide": {"elem": "Sfd", "species": ["H2Sfd", "HSfd-", "Sfd-2"], "gas": "H2Sfd"},
    "sulfite": {"elem": "Sft", "species": ["SftO2", "HSftO3-", "SftO3-2"], "gas": "SftO2"},
    "sulfate": {"elem": "Sfa", "species": ["HSfaO4-", "SfaO4-2"], "gas": None},
    "ammonia": {"elem": "Amn", "species": ["AmnH4+", "AmnH3"], "gas": "AmnH3"},
    "nitrate": {"elem": "Ntr", "species": ["HNtrO3", "NtrO3-"], "gas": "HNtrO3"},
    "fluoride": {"elem": "Flr", "species": ["HFlr", "Flr-"], "gas": "HFlr"},
    "chloride": {"elem": "Chl", "species": ["HChl", "Chl-"], "gas": "HChl"},
    "phosphate": {"elem": "Phs", "species": ["H3PhsO4", "H2PhsO4-", "HPhsO4-2", "PhsO4-3"], "gas": None},
    "acetate": {"elem": "Act", "species": ["HAct", "Act-"], "gas": "HAct"},
    "cyanide": {"elem": "Cyn", "species": ["HCyn", "Cyn-"], "gas": "HCyn"},
    "hypochlorite": {"elem": "Hpc", "species": ["HHpcO", "HpcO-"], "gas": None},
}
# Species formed from two families (data/combined.yaml). Dissolved chlorine takes one Cl from
# hypochlorite (Hpc) and one from chloride (Chl): HOCl + H+ + Cl- = Cl2 + H2O. Without any
# redox reaction in the run, separate mass balances for the two are exact.
COMBINED_COPIES = {"chlorine": {"formula": "HpcChl"}}
ION_COPIES = {"Na+": {"elem": "Sod", "species": "Sod+"}, "K+": {"elem": "Pot", "species": "Pot+"}}

# Per database: for each family the database's element symbol, the master species of the
# valence state used, the database's species in offgas's order (None where the database
# has no such species), and the database's gas phase (None where it has none).
DB_FAMILIES = {
    "phreeqc.dat": {
        "carbonate": {"elem": "C", "master": "CO3-2", "species": ["CO2", "HCO3-", "CO3-2"], "gas": "CO2(g)"},
        "sulfide": {"elem": "S", "master": "HS-", "species": ["H2S", "HS-", "S-2"], "gas": "H2S(g)"},
        "sulfate": {"elem": "S", "master": "SO4-2", "species": ["HSO4-", "SO4-2"], "gas": None},
        "ammonia": {"elem": "N", "master": "NH4+", "species": ["NH4+", "NH3"], "gas": "NH3(g)"},
        "nitrate": {"elem": "N", "master": "NO3-", "species": [None, "NO3-"], "gas": None},
        "fluoride": {"elem": "F", "master": "F-", "species": ["HF", "F-"], "gas": None},
        "chloride": {"elem": "Cl", "master": "Cl-", "species": ["HCl", "Cl-"], "gas": None},
        "phosphate": {"elem": "P", "master": "PO4-3", "species": ["H3PO4", "H2PO4-", "HPO4-2", "PO4-3"], "gas": None},
    },
    "llnl.dat": {
        "carbonate": {"elem": "C", "master": "HCO3-", "species": ["CO2", "HCO3-", "CO3-2"], "gas": "CO2(g)"},
        "sulfide": {"elem": "S", "master": "HS-", "species": ["H2S", "HS-", "S-2"], "gas": "H2S(g)"},
        "sulfite": {"elem": "S", "master": "SO3-2", "species": ["SO2", "HSO3-", "SO3-2"], "gas": "SO2(g)"},
        "sulfate": {"elem": "S", "master": "SO4-2", "species": ["HSO4-", "SO4-2"], "gas": None},
        "ammonia": {"elem": "N", "master": "NH3", "species": ["NH4+", "NH3"], "gas": "NH3(g)"},
        "nitrate": {"elem": "N", "master": "NO3-", "species": ["HNO3", "NO3-"], "gas": None},
        "fluoride": {"elem": "F", "master": "F-", "species": ["HF", "F-"], "gas": "HF(g)"},
        "chloride": {"elem": "Cl", "master": "Cl-", "species": ["HCl", "Cl-"], "gas": "HCl(g)"},
        "acetate": {"elem": "Acetate", "master": "HAcetate", "species": ["HAcetate", "Acetate-"], "gas": None},
        "cyanide": {"elem": "Cyanide", "master": "Cyanide-", "species": ["HCyanide", "Cyanide-"], "gas": None},
        "hypochlorite": {"elem": "Cl", "master": "ClO-", "species": ["HClO", "ClO-"], "gas": None},
    },
    "minteq.v4.dat": {
        "carbonate": {"elem": "C", "master": "CO3-2", "species": ["H2CO3", "HCO3-", "CO3-2"], "gas": "CO2(g)"},
        "sulfide": {"elem": "S", "master": "HS-", "species": ["H2S", "HS-", "S-2"], "gas": "H2S(g)"},
        "sulfate": {"elem": "S", "master": "SO4-2", "species": ["HSO4-", "SO4-2"], "gas": None},
        "ammonia": {"elem": "N", "master": "NH4+", "species": ["NH4+", "NH3"], "gas": None},
        "fluoride": {"elem": "F", "master": "F-", "species": ["HF", "F-"], "gas": None},
        "chloride": {"elem": "Cl", "master": "Cl-", "species": [None, "Cl-"], "gas": None},
        "acetate": {"elem": "Acetate", "master": "Acetate-", "species": ["H(Acetate)", "Acetate-"], "gas": None},
        "cyanide": {"elem": "Cyanide", "master": "Cyanide-", "species": ["HCyanide", "Cyanide-"], "gas": None},
    },
}
DB_IONS = {db: {"Na+": {"elem": "Na", "master": "Na+"}, "K+": {"elem": "K", "master": "K+"}} for db in DB_FAMILIES}
# Species left out of a database run, with the reason (written to the notes).
DB_DROP = {
    "llnl.dat": {
        "H2SO3": "llnl.dat defines dissolved SO2 twice (SO2 and H2SO3, with nearly the same "
        "constant), which counts SO2.H2O twice and halves the SO2 pressure; H2SO3 is left out "
        "and SO2 kept, because SO2(g) is written against SO2."
    },
}
# Gas phases added to a database run because the database has none for a family whose
# aqueous species it carries: taken from offgas's Henry's law constant (species.yaml).
DB_ADDED_GASES = {"minteq.v4.dat": ["cyanide"], "llnl.dat": ["cyanide"]}
# Combined-species gases a database defines only through redox with O2: the gas = parents
# reaction is the sum of database reactions in which O2 cancels (checked when built).
# llnl.dat: Cl2(g) + H2O = 0.5 O2 + 2 Cl- + 2 H+; Cl- + 0.5 O2 = ClO-; H+ + ClO- = HClO;
# sum: Cl2(g) + H2O = HClO + H+ + Cl-. llnl.dat has no dissolved Cl2.
DB_COMBINED_GASES = {
    "llnl.dat": {"chlorine": {"phase": "Cl2(g)", "species": ["ClO-", "HClO"],
                              "target": {"HClO": 1, "H+": 1, "Cl-": 1, "Cl2": -1, "H2O": -1}}},
}

# --------------------------------------------------------------------------------------
# The cases. Concentrations are mol per litre of liquid; a family's total counts what is
# in the liquid and in the headspace. Chloride is a family (HCl/Cl-), not a strong ion.
# --------------------------------------------------------------------------------------
CASES = [
    # ---- phreeqc.dat: CO2, H2S, NH3 (Peng-Robinson gas phase in the database run) ----
    dict(id="pdat_h2s_hand_check", database="phreeqc.dat", t=25.0, vl=1.0, vg=1.0,
         families={"sulfide": 0.01, "chloride": 0.02}, ions={"Na+": 0.01},
         description="Hand check: 0.01 M NaHS + 0.02 M HCl, 1 L liquid, 1 L headspace (50 %); p(H2S) about 0.07 atm."),
    dict(id="pdat_co2_bicarbonate_acid_dilute", database="phreeqc.dat", t=25.0, vl=10.0, vg=2.0,
         families={"carbonate": 0.005, "chloride": 0.003}, ions={"K+": 0.005},
         description="Dilute KHCO3 partly acidified with HCl (K+ has one pair with bicarbonate in phreeqc.dat, KHCO3); headspace 17 %."),
    dict(id="pdat_co2_carbonate_10c", database="phreeqc.dat", t=10.0, vl=19.0, vg=1.0,
         families={"carbonate": 0.002, "chloride": 0.0035}, ions={"K+": 0.004},
         description="K2CO3 over-acidified with HCl at 10 °C; small headspace (5 %)."),
    dict(id="pdat_co2_40c_large_headspace", database="phreeqc.dat", t=40.0, vl=4.0, vg=6.0,
         families={"carbonate": 0.01, "chloride": 0.006}, ions={"K+": 0.01},
         description="KHCO3 + HCl at 40 °C with a large headspace (60 %)."),
    dict(id="pdat_nh3_ammonium_caustic", database="phreeqc.dat", t=25.0, vl=20.0, vg=5.0,
         families={"ammonia": 0.05, "chloride": 0.05}, ions={"Na+": 0.03},
         description="NH4Cl 0.05 M with NaOH 0.03 M: ammonia buffer near pH 9.4; headspace 20 %."),
    dict(id="pdat_nh3_10c", database="phreeqc.dat", t=10.0, vl=8.0, vg=2.0,
         families={"ammonia": 0.02, "chloride": 0.01}, ions={"K+": 0.015},
         description="Ammonia buffer with excess KOH at 10 °C; headspace 20 %."),
    dict(id="pdat_nh3_40c", database="phreeqc.dat", t=40.0, vl=15.0, vg=5.0,
         families={"ammonia": 0.1, "chloride": 0.08}, ions={"K+": 0.1},
         description="Ammonium chloride with KOH in excess at 40 °C; headspace 25 %."),
    dict(id="pdat_sulfide_alkaline", database="phreeqc.dat", t=25.0, vl=10.0, vg=10.0,
         families={"sulfide": 0.02, "chloride": 0.01}, ions={"Na+": 0.03},
         description="Na2S partly neutralised with HCl: alkaline, little H2S; headspace 50 %."),
    dict(id="pdat_sulfide_40c_acid", database="phreeqc.dat", t=40.0, vl=5.0, vg=1.0,
         families={"sulfide": 0.005, "chloride": 0.012}, ions={"Na+": 0.005},
         description="NaHS poured into excess HCl at 40 °C; headspace 17 %."),
    dict(id="pdat_compete_sulfide_carbonate_ammonia", database="phreeqc.dat", t=25.0, vl=10.0, vg=5.0,
         families={"sulfide": 0.01, "carbonate": 0.02, "ammonia": 0.02, "chloride": 0.025}, ions={"Na+": 0.03},
         description="Sulfide, carbonate and ammonium compete for the protons of HCl; H2S, CO2 and NH3 all in the headspace; 33 %."),
    dict(id="pdat_compete_high_ionic_strength", database="phreeqc.dat", t=25.0, vl=8.0, vg=4.0,
         families={"sulfide": 0.01, "carbonate": 0.01, "chloride": 0.47}, ions={"K+": 0.46},
         description="Sulfide and carbonate acidified in 0.45 M KCl (I near 0.47)."),
    dict(id="pdat_ammonium_sulfate_caustic", database="phreeqc.dat", t=25.0, vl=10.0, vg=3.0,
         families={"ammonia": 0.2, "sulfate": 0.1}, ions={"K+": 0.08},
         description="(NH4)2SO4 0.1 M with KOH 0.08 M: I near 0.38; NH4SO4- and KSO4- pairs in the database run."),
    dict(id="pdat_phosphate_carbonate_acid", database="phreeqc.dat", t=25.0, vl=10.0, vg=2.0,
         families={"phosphate": 0.02, "carbonate": 0.01, "chloride": 0.02}, ions={"K+": 0.05},
         description="K2HPO4 + KHCO3 buffered, then HCl: phosphate and carbonate compete; headspace 17 %."),
    dict(id="pdat_fluoride_acid", database="phreeqc.dat", t=25.0, vl=10.0, vg=5.0,
         families={"fluoride": 0.02, "chloride": 0.025}, ions={"K+": 0.02},
         description="KF + HCl: HF(aq) with HF2- in phreeqc.dat (which has no HF gas, so the gas is compared with the offgas-constants run only)."),
    # ---- llnl.dat: SO2, HF, HCl, acetate, and the same families again ----
    dict(id="llnl_so2_sulfite_acid", database="llnl.dat", t=25.0, vl=7.0, vg=3.0,
         families={"sulfite": 0.01, "chloride": 0.03}, ions={"Na+": 0.02},
         description="Na2SO3 poured into excess HCl: SO2 gas; headspace 30 %."),
    dict(id="llnl_so2_bisulfite", database="llnl.dat", t=25.0, vl=10.0, vg=10.0,
         families={"sulfite": 0.05}, ions={"Na+": 0.05},
         description="NaHSO3 0.05 M alone (pH near 4.5): SO2 above bisulfite; headspace 50 %."),
    dict(id="llnl_so2_10c", database="llnl.dat", t=10.0, vl=18.0, vg=2.0,
         families={"sulfite": 0.02, "chloride": 0.025}, ions={"K+": 0.02},
         description="KHSO3 + HCl at 10 °C; headspace 10 %."),
    dict(id="llnl_so2_high_ionic_strength", database="llnl.dat", t=25.0, vl=10.0, vg=2.5,
         families={"sulfite": 0.01, "chloride": 0.46}, ions={"Na+": 0.45},
         description="Sulfite acidified in 0.44 M NaCl (I near 0.46; NaCl ion pair in llnl.dat)."),
    dict(id="llnl_hf_acid", database="llnl.dat", t=25.0, vl=10.0, vg=5.0,
         families={"fluoride": 0.05, "chloride": 0.06}, ions={"K+": 0.05},
         description="KF + excess HCl: HF gas; llnl.dat carries HF2- and the H2F2 dimer (see notes)."),
    dict(id="llnl_hf_dilute_40c", database="llnl.dat", t=40.0, vl=5.0, vg=5.0,
         families={"fluoride": 0.002, "chloride": 0.003}, ions={"K+": 0.002},
         description="Dilute KF + HCl at 40 °C, where the dimer hardly matters; headspace 50 %."),
    dict(id="llnl_hcl_strong_acid", database="llnl.dat", t=25.0, vl=10.0, vg=10.0,
         families={"chloride": 0.45},
         description="Hydrochloric acid 0.45 M: HCl gas over strong acid (I near 0.45)."),
    dict(id="llnl_hcl_acid_salt_40c", database="llnl.dat", t=40.0, vl=5.0, vg=2.0,
         families={"chloride": 0.4}, ions={"K+": 0.1},
         description="HCl 0.3 M in 0.1 M KCl at 40 °C."),
    dict(id="llnl_acetic_acid_hand_check", database="llnl.dat", t=25.0, vl=10.0, vg=0.53,
         families={"acetate": 0.1},
         description="Hand check: 0.1 M acetic acid, pH about 2.88; headspace 5 %."),
    dict(id="llnl_compete_four_families", database="llnl.dat", t=25.0, vl=10.0, vg=5.0,
         families={"sulfide": 0.01, "carbonate": 0.02, "ammonia": 0.03, "acetate": 0.02, "chloride": 0.04},
         ions={"Na+": 0.05},
         description="Sulfide + carbonate + ammonia + acetate with HCl: four families compete for protons; 33 % headspace."),
    dict(id="llnl_compete_40c", database="llnl.dat", t=40.0, vl=6.0, vg=4.0,
         families={"sulfide": 0.005, "carbonate": 0.01, "ammonia": 0.01, "acetate": 0.05},
         ions={"Na+": 0.03},
         description="Acetic acid partly neutralised, with sulfide, carbonate and ammonia, at 40 °C; 40 % headspace."),
    dict(id="llnl_ammonium_bicarbonate", database="llnl.dat", t=25.0, vl=10.0, vg=5.0,
         families={"ammonia": 0.1, "carbonate": 0.1},
         description="NH4HCO3 0.1 M: NH3 and CO2 in the same headspace."),
    dict(id="llnl_sulfite_sulfide_acid_10c", database="llnl.dat", t=10.0, vl=9.0, vg=1.0,
         families={"sulfite": 0.005, "sulfide": 0.005, "chloride": 0.02}, ions={"Na+": 0.015},
         description="Sulfite and sulfide (non-reacting copies: no thiosulfate/sulfur formation) acidified at 10 °C."),
    dict(id="llnl_cl2_bleach_into_acid", database="llnl.dat", t=25.0, vl=10.0, vg=5.0,
         families={"hypochlorite": 0.01, "chloride": 0.03}, ions={"Na+": 0.01},
         description="NaOCl 0.01 M into excess HCl: Cl2 from HOCl + H+ + Cl-; headspace 33 % (llnl.dat has no dissolved Cl2, see notes)."),
    dict(id="llnl_cl2_bleach_acetic_10c", database="llnl.dat", t=10.0, vl=9.0, vg=1.0,
         families={"hypochlorite": 0.02, "chloride": 0.08, "acetate": 0.1}, ions={"Na+": 0.15},
         description="NaOCl 0.02 M + NaCl 0.08 M in an acetic acid/acetate buffer at 10 °C (pH near 5): mostly HOCl, a little Cl2; headspace 10 %."),
    dict(id="llnl_cl2_high_chloride_40c", database="llnl.dat", t=40.0, vl=6.0, vg=4.0,
         families={"hypochlorite": 0.005, "chloride": 0.4}, ions={"Na+": 0.3},
         description="Hypochlorite in 0.3 M NaCl with 0.1 M HCl at 40 °C (I near 0.4); headspace 40 %."),
    # ---- minteq.v4.dat: cyanide (HCN gas phase added from offgas's Henry constant) ----
    dict(id="mtq_hcn_alkaline_cyanide", database="minteq.v4.dat", t=25.0, vl=10.0, vg=10.0,
         families={"cyanide": 0.01}, ions={"K+": 0.01},
         description="KCN 0.01 M alone (pH near 10.6): HCN over alkaline cyanide; headspace 50 %."),
    dict(id="mtq_hcn_acidified", database="minteq.v4.dat", t=25.0, vl=10.0, vg=3.0,
         families={"cyanide": 0.01, "chloride": 0.02}, ions={"K+": 0.01},
         description="KCN + excess HCl: nearly all cyanide as HCN; headspace 23 %."),
    dict(id="mtq_hcn_10c", database="minteq.v4.dat", t=10.0, vl=19.0, vg=1.0,
         families={"cyanide": 0.02, "chloride": 0.015}, ions={"K+": 0.02},
         description="KCN partly neutralised at 10 °C; headspace 5 %."),
    dict(id="mtq_hcn_40c", database="minteq.v4.dat", t=40.0, vl=4.0, vg=6.0,
         families={"cyanide": 0.005, "chloride": 0.01}, ions={"K+": 0.005},
         description="KCN + HCl at 40 °C, headspace 60 %."),
    dict(id="mtq_hcn_carbonate_compete", database="minteq.v4.dat", t=25.0, vl=10.0, vg=5.0,
         families={"cyanide": 0.01, "carbonate": 0.02, "chloride": 0.025}, ions={"Na+": 0.03},
         description="NaCN + Na2CO3/NaHCO3 acidified: cyanide and carbonate compete; HCN and CO2 (NaCO3- and NaHCO3 pairs in minteq.v4.dat)."),
    dict(id="mtq_hcn_high_ionic_strength", database="minteq.v4.dat", t=25.0, vl=10.0, vg=2.0,
         families={"cyanide": 0.01, "chloride": 0.46}, ions={"K+": 0.46},
         description="KCN in 0.45 M KCl with a little HCl (I near 0.47)."),
    dict(id="mtq_acetate_sulfide", database="minteq.v4.dat", t=25.0, vl=10.0, vg=5.0,
         families={"acetate": 0.05, "sulfide": 0.01}, ions={"K+": 0.04},
         description="Acetic acid with KHS/K acetate: acetic acid and sulfide compete; H2S in the headspace."),
]

# --------------------------------------------------------------------------------------
# Formula and equation parsing
# --------------------------------------------------------------------------------------
_CHARGE = re.compile(r"([+-]\d*(?:\.\d+)?)$")


def split_charge(name: str) -> tuple[str, float]:
    """'SO4-2' -> ('SO4', -2); 'Na+' -> ('Na', 1); 'CO2' -> ('CO2', 0)."""
    if name in ("e-",):
        return "", -1.0
    m = _CHARGE.search(name)
    if not m or m.start() == 0:
        return name, 0.0
    s = m.group(1)
    mag = float(s[1:]) if len(s) > 1 else 1.0
    return name[: m.start()], (mag if s[0] == "+" else -mag)


def parse_formula(name: str) -> tuple[Counter, float]:
    """Element counts and charge of a species name ('(CO2)2', 'H(Acetate)', 'Na(Acetate)2-')."""
    body, charge = split_charge(name)
    pos = 0

    def number() -> float:
        nonlocal pos
        m = re.match(r"\d+(?:\.\d+)?", body[pos:])
        if not m:
            return 1.0
        pos += m.end()
        return float(m.group(0))

    def group() -> Counter:
        nonlocal pos
        out = Counter()
        while pos < len(body):
            ch = body[pos]
            if ch == "(":
                pos += 1
                inner = group()
                if pos >= len(body) or body[pos] != ")":
                    raise ValueError(f"unbalanced parentheses in {name}")
                pos += 1
                k = number()
                for e, v in inner.items():
                    out[e] += v * k
            elif ch == ")":
                return out
            elif ch.isupper():
                m = re.match(r"[A-Z][a-z]*", body[pos:])
                pos += m.end()
                out[m.group(0)] += number()
            elif ch == ":":
                pos += 1
                k = number()
                rest = group()
                for e, v in rest.items():
                    out[e] += v * k
            else:
                raise ValueError(f"cannot parse {name!r} at {body[pos:]!r}")
        return out

    return group(), charge


def rename_elements(name: str, emap: dict[str, str]) -> str:
    """Renames element symbols in a species name ('NH4SO4-', {'N': 'Amn', 'S': 'Sfa'})."""
    return re.sub(r"[A-Z][a-z]*", lambda m: emap.get(m.group(0), m.group(0)), name)


_COEF = re.compile(r"^(\d+(?:\.\d+)?|\.\d+)([A-Za-z(].*)$")


def parse_side(text: str) -> list[tuple[float, str]]:
    out = []
    coef = None
    for tok in text.split():
        if tok == "+":
            continue
        if re.fullmatch(r"\d+(?:\.\d+)?|\.\d+", tok):
            coef = float(tok)
            continue
        m = _COEF.match(tok)
        if m and not tok[0].isalpha():
            out.append((float(m.group(1)), m.group(2)))
        else:
            out.append((coef if coef is not None else 1.0, tok))
        coef = None
    return out


def parse_equation(eq: str) -> tuple[list, list]:
    lhs, rhs = eq.split("=", 1)
    return parse_side(lhs), parse_side(rhs)


def balanced(lhs, rhs) -> bool:
    tot = Counter()
    charge = 0.0
    for sign, side in ((1, lhs), (-1, rhs)):
        for c, s in side:
            if s == "e-":
                charge += sign * c * -1
                continue
            el, z = parse_formula(s)
            for e, v in el.items():
                tot[e] += sign * c * v
            charge += sign * c * z
    return all(abs(v) < 1e-9 for v in tot.values()) and abs(charge) < 1e-9


# --------------------------------------------------------------------------------------
# Database reading
# --------------------------------------------------------------------------------------
KEYWORDS = {
    "SOLUTION_MASTER_SPECIES", "SOLUTION_SPECIES", "PHASES", "EXCHANGE_MASTER_SPECIES",
    "EXCHANGE_SPECIES", "SURFACE_MASTER_SPECIES", "SURFACE_SPECIES", "RATES", "END",
    "LLNL_AQUEOUS_MODEL_PARAMETERS", "NAMED_EXPRESSIONS", "MEAN_GAMMAS", "SOLUTION",
    "KNOBS", "ISOTOPES", "ISOTOPE_RATIOS", "ISOTOPE_ALPHAS", "CALCULATE_VALUES", "PITZER",
    "SIT", "GAS_BINARY_PARAMETERS", "SELECTED_OUTPUT", "USER_PUNCH", "PRINT",
}
PHASE_OPTIONS = {
    "log_k", "logk", "l", "delta_h", "deltah", "d", "analytic", "analytical_expression",
    "a_e", "a", "t_c", "p_c", "omega", "vm", "add_logk", "add_log_k", "add_constant",
    "no_check", "n", "gamma",
}
CONSTANT_OPTIONS = {
    "log_k", "logk", "l", "delta_h", "deltah", "d", "analytic", "analytical_expression",
    "a_e", "a", "add_logk", "add_log_k", "add_constant", "mass_balance", "no_check",
}


def _options(line: str) -> list[str]:
    return [p.strip() for p in line.split(";") if p.strip()]


def _optname(opt: str) -> str:
    return opt.split()[0].lstrip("-").lower()


def analytic_of(opts: list[str]) -> list[float]:
    """A reaction's log K(T) as six -analytic coefficients (A1 + A2 T + A3/T + A4 log10 T +
    A5/T^2 + A6 T^2), as PHREEQC takes it: the analytic expression when there is one, else
    a constant log_k (only reactions without an enthalpy are accepted here)."""
    for o in opts:
        if _optname(o) in ("analytic", "analytical_expression", "a_e", "a"):
            v = [float(x) for x in o.split()[1:]]
            return (v + [0.0] * 6)[:6]
    log_k, dh = None, 0.0
    for o in opts:
        if _optname(o) in ("log_k", "logk", "l"):
            log_k = float(o.split()[1])
        if _optname(o) in ("delta_h", "deltah", "d"):
            dh = float(o.split()[1])
    if log_k is None or dh != 0.0:
        raise ValueError(f"cannot combine {opts}")
    return [log_k, 0.0, 0.0, 0.0, 0.0, 0.0]


class Database:
    """The parts of a PHREEQC database this script copies from."""

    def __init__(self, name: str):
        self.name = name
        self.masters: dict[str, tuple[str, str]] = {}  # master species -> (element, alkalinity)
        self.elements: set[str] = set()
        self.species: dict[str, tuple[str, list[str]]] = {}  # defined species -> (equation, options); last wins
        self.order: list[str] = []
        self.phases: dict[str, tuple[str, list[str]]] = {}  # exact name -> (equation, options); first wins
        self._read(DBDIR / name)

    def _read(self, path: Path) -> None:
        section = None
        cur = None  # ('S', defined, eq, opts) or ('P', name, eq, opts)
        for raw in path.read_text(encoding="latin-1").splitlines():
            line = raw.split("#", 1)[0].rstrip()
            if not line.strip():
                continue
            first = line.split()[0]
            if first.upper() in KEYWORDS and not line[0].isspace():
                self._close(cur)
                cur = None
                section = first.upper()
                continue
            s = line.strip()
            if section == "SOLUTION_MASTER_SPECIES":
                w = s.split()
                if len(w) >= 3:
                    self.elements.add(re.sub(r"\(.*\)$", "", w[0]))
                    self.masters.setdefault(w[1], (w[0], w[2]))
            elif section == "SOLUTION_SPECIES":
                if "=" in s and not s.startswith("-"):
                    self._close(cur)
                    lhs, rhs = parse_equation(s)
                    cur = ["S", rhs[0][1] if rhs else "", s, []]
                elif cur is not None:
                    cur[3].extend(_options(s))
            elif section == "PHASES":
                if "=" in s and not s.startswith("-"):
                    if cur is not None and cur[2] is None:
                        cur[2] = s
                    continue
                if not s.startswith("-") and _optname(s) not in PHASE_OPTIONS:
                    self._close(cur)
                    cur = ["P", s.split()[0], None, []]
                elif cur is not None:
                    cur[3].extend(_options(s))
        self._close(cur)

    def _close(self, cur) -> None:
        if cur is None:
            return
        kind, name, eq, opts = cur
        if kind == "S":
            if name not in self.species:
                self.order.append(name)
            self.species[name] = (eq, opts)
        elif eq is not None:
            self.phases.setdefault(name, (eq, opts))


_DB_CACHE: dict[str, Database] = {}


def database(name: str) -> Database:
    if name not in _DB_CACHE:
        _DB_CACHE[name] = Database(name)
    return _DB_CACHE[name]


# --------------------------------------------------------------------------------------
# offgas's constants (data/species.yaml, data/physical.yaml)
# --------------------------------------------------------------------------------------
class Offgas:
    def __init__(self):
        sp = yaml.safe_load(SPECIES_YAML.read_text(encoding="utf-8"))
        ph = yaml.safe_load(PHYSICAL_YAML.read_text(encoding="utf-8"))
        self.families = {f["id"]: f for f in sp["families"]}
        self.ions = {i["formula"]: i for i in sp["strong_ions"]}
        self.r = float(ph["constants"]["gas_constant"]["value"])
        self.t_ref = float(ph["constants"]["reference_temperature"]["value"])
        self.p_std = float(ph["constants"]["standard_pressure"]["value"])
        self.t0 = float(ph["constants"]["kelvin_offset"]["value"])
        w = self.families["water"]["kw_equation"]
        self.kw = (float(w["a"]), float(w["b"]), float(w["c"]))
        self.davies = ph["davies"]
        comb_path = ROOT / "data" / "combined.yaml"
        comb = yaml.safe_load(comb_path.read_text(encoding="utf-8")) if comb_path.exists() else {}
        self.combined = {c["id"]: c for c in (comb or {}).get("combined", [])}

    def combined_in(self, families) -> list[str]:
        """Combined species (with a copy set up here) whose two parent families are present."""
        return [cid for cid, c in self.combined.items() if cid in COMBINED_COPIES
                and c["first"]["family"] in families and c["second"]["family"] in families]

    def log_kf_combined(self, cid, t_k):
        c = self.combined[cid]
        return float(c["log_k_formation"]) - float(c["dh_formation"]) * 1e3 / (self.r * math.log(10)) * (1 / t_k - 1 / self.t_ref)

    def log_kh_combined(self, cid, t_k):
        v = self.combined[cid].get("volatile")
        if not v:
            return None
        hcp = float(v["hcp"]) * math.exp(float(v["hcp_b"]) * (1 / t_k - 1 / self.t_ref))
        return math.log10(hcp * self.p_std / 1000.0)

    def combined_parts(self, cid):
        """(first copy species, second copy species, protons, product copy formula)."""
        c = self.combined[cid]
        out = []
        for side in ("first", "second"):
            fid = c[side]["family"]
            names = [s["formula"] for s in self.family(fid)["species"]]
            out.append(COPIES[fid]["species"][names.index(c[side]["species"])])
        return out[0], out[1], int(c["protons"]), COMBINED_COPIES[cid]["formula"]

    def debye_huckel_a(self, t_k):
        """offgas's Debye-Hueckel A(T) (data/physical.yaml), as in src/catalog/physical.rs."""
        d = self.davies
        t = t_k - self.t0
        e, r = d["permittivity"], d["density"]
        f = float  # PyYAML reads 1.82483e6 (no exponent sign) as a string
        eps = f(e["e0"]) + f(e["e1"]) * t + f(e["e2"]) * t * t + f(e["e3"]) * t ** 3
        rho = f(r["d0"]) + f(r["d1"]) * t + f(r["d2"]) * t * t
        return f(d["a_prefactor"]["value"]) * math.sqrt(rho) / (eps * t_k) ** 1.5

    def family(self, fid):
        return self.families[fid]

    def log_ka(self, fid, step, t_k):
        s = self.families[fid]["steps"][step]
        shift = float(s["dh"]) * 1e3 / (self.r * math.log(10)) * (1 / t_k - 1 / self.t_ref)
        return -(float(s["pka"]) + shift)

    def log_kw(self, t_k):
        a, b, c = self.kw
        return -(a / t_k + b + c * t_k)

    def log_kh(self, fid, t_k):
        """log10 of Hcp(T) in mol/(kg atm) (mol/L per atm, 1 L of liquid = 1 kg of water)."""
        v = self.families[fid].get("volatile")
        if not v:
            return None
        hcp = float(v["hcp"]) * math.exp(float(v["hcp_b"]) * (1 / t_k - 1 / self.t_ref))
        return math.log10(hcp * self.p_std / 1000.0)

    def gas(self, fid):
        v = self.families[fid].get("volatile")
        return v["gas"] if v else None

    def volatile_index(self, fid):
        v = self.families[fid].get("volatile")
        if not v:
            return None
        names = [s["formula"] for s in self.families[fid]["species"]]
        return names.index(v["species"])

    def molar_mass(self, fid):
        return float(self.families[fid]["species"][-1]["molar_mass"])


def _check_copies(og: Offgas) -> None:
    """The copies must mirror offgas's families (species count, charges, volatile species)."""
    used = set()
    for fid, cp in COPIES.items():
        fam = og.family(fid)
        assert len(cp["species"]) == len(fam["species"]), fid
        for mine, theirs in zip(cp["species"], fam["species"]):
            assert split_charge(mine)[1] == theirs["charge"], (fid, mine)
        vi = og.volatile_index(fid)
        assert (vi is None) == (cp["gas"] is None), fid
        if vi is not None:
            assert cp["species"][vi] == cp["gas"], fid
        used.add(cp["elem"])
    used |= {c["elem"] for c in ION_COPIES.values()}
    for db in DB_FAMILIES:
        clash = used & database(db).elements
        assert not clash, f"copy element names {clash} exist in {db}"


# --------------------------------------------------------------------------------------
# PHREEQC input: the database runs
# --------------------------------------------------------------------------------------
def _analytic_vant_hoff(log_k25: float, dh_kj: float, og: Offgas) -> str:
    """-analytic A1 0 A3: log K(T) = log K(T_ref) - dH/(R ln10) (1/T - 1/T_ref), exactly
    offgas's van 't Hoff form with offgas's R and reference temperature."""
    a3 = -dh_kj * 1e3 / (og.r * math.log(10))
    a1 = log_k25 - a3 / og.t_ref
    return f"-analytic {a1!r} 0 {a3!r}"


class DbSetup:
    """Non-reacting copies of a database's families and the species built from them."""

    def __init__(self, dbname: str, og: Offgas):
        self.dbname = dbname
        self.db = database(dbname)
        self.og = og
        fams = DB_FAMILIES[dbname]
        ions = DB_IONS[dbname]
        self.component_of: dict[str, tuple] = {}  # db species -> (kind, id)
        self.emap_of: dict[tuple, dict] = {}
        for fid, spec in fams.items():
            self.emap_of[("f", fid)] = {spec["elem"]: COPIES[fid]["elem"]}
        for iid, spec in ions.items():
            self.emap_of[("i", iid)] = {spec["elem"]: ION_COPIES[iid]["elem"]}
        avail = {"H+": frozenset(), "H2O": frozenset(), "OH-": frozenset()}
        for fid, spec in fams.items():
            avail[spec["master"]] = frozenset([("f", fid)])
        for iid, spec in ions.items():
            avail[spec["master"]] = frozenset([("i", iid)])
        drop = DB_DROP.get(dbname, {})
        self.selected: list[dict] = []  # {'db': name, 'copy': name, 'eq': copy eq, 'opts', 'comps'}
        self.excluded_unbalanced: list[str] = []
        changed = True
        done = set()
        while changed:
            changed = False
            for name in self.db.order:
                if name in avail or name in done or name in drop:
                    continue
                eq, opts = self.db.species[name]
                lhs, rhs = parse_equation(eq)
                others = [s for _, s in lhs] + [s for _, s in rhs[1:]]
                if any(s in ("e-", "O2", "H2") for s in others):
                    done.add(name)
                    continue
                if not all(s in avail for s in others):
                    continue
                done.add(name)
                if not balanced(lhs, rhs):
                    self.excluded_unbalanced.append(name)
                    continue
                comps = frozenset().union(*[avail[s] for s in others])
                emap = {}
                clash = False
                for c in comps:
                    for k, v in self.emap_of[c].items():
                        if k in emap and emap[k] != v:
                            clash = True
                        emap[k] = v
                if clash:
                    continue
                avail[name] = comps
                self.selected.append({
                    "db": name, "copy": rename_elements(name, emap),
                    "eq": " ".join(self._rename_eq(eq, emap)), "opts": opts, "comps": comps,
                })
                changed = True
        self.avail = avail
        # every listed family species must be there
        for fid, spec in fams.items():
            for s in spec["species"]:
                if s is not None:
                    assert s in avail, f"{dbname}: {fid} species {s} not found"
        self.copy_name = {s["db"]: s["copy"] for s in self.selected}
        for fid, spec in fams.items():
            self.copy_name[spec["master"]] = rename_elements(spec["master"], self.emap_of[("f", fid)])
        for iid, spec in ions.items():
            self.copy_name[spec["master"]] = rename_elements(spec["master"], self.emap_of[("i", iid)])
        self.definitions = self._definitions()

    @staticmethod
    def _rename_eq(eq, emap):
        out = []
        for tok in eq.split():
            if tok in ("+", "="):
                out.append(tok)
                continue
            m = _COEF.match(tok)
            if re.fullmatch(r"\d+(?:\.\d+)?|\.\d+", tok):
                out.append(tok)
            elif m and not tok[0].isalpha():
                out.append(m.group(1) + " " + rename_elements(m.group(2), emap))
            else:
                out.append(rename_elements(tok, emap))
        return out

    def master_options(self, master: str) -> list[str]:
        """The master species' activity options, without its (redox) formation constants."""
        if master not in self.db.species:
            return []
        _, opts = self.db.species[master]
        return [o for o in opts if _optname(o) not in CONSTANT_OPTIONS]

    def gfw(self, kind, cid):
        if kind == "f":
            return self.og.molar_mass(cid)
        return float(self.og.ions[cid]["molar_mass"])

    def gas_phases(self) -> list[dict]:
        """Each gas of this database's runs: key (family or combined id), parents (families
        that must be present), copy phase name, equation, options, source, kind."""
        out = []
        for fid, spec in DB_FAMILIES[self.dbname].items():
            if spec["gas"] is None:
                continue
            eq, opts = self.db.phases[spec["gas"]]
            emap = self.emap_of[("f", fid)]
            lhs, _ = parse_equation(eq)
            out.append({"key": fid, "parents": (fid,), "gas": self.og.gas(fid), "kind": "family",
                        "name": rename_elements(lhs[0][1], emap) + "(g)",
                        "eq": " ".join(self._rename_eq(eq, emap)), "opts": opts,
                        "source": f"{self.dbname} phase {spec['gas']}"})
        for fid in DB_ADDED_GASES.get(self.dbname, []):
            neutral = COPIES[fid]["gas"]
            vol = self.og.family(fid)["volatile"]
            log_k = math.log10(float(vol["hcp"]) * self.og.p_std / 1000.0)
            dh = -self.og.r * float(vol["hcp_b"]) / 1000.0
            out.append({"key": fid, "parents": (fid,), "gas": self.og.gas(fid), "kind": "added",
                        "name": neutral + "(g)", "eq": f"{neutral} = {neutral}",
                        "opts": [f"-log_k {log_k!r}", f"-delta_h {dh!r} kJ"],
                        "source": "added: offgas data/species.yaml Henry's law constant"})
        for cid, spec in DB_COMBINED_GASES.get(self.dbname, {}).items():
            out.append(self._combined_gas(cid, spec))
        return out

    def _combined_gas(self, cid: str, spec: dict) -> dict:
        """A combined-species gas as the sum of database reactions in which O2 cancels."""
        c = self.og.combined[cid]
        fa, fb = c["first"]["family"], c["second"]["family"]
        peq, popts = self.db.phases[spec["phase"]]
        parts = [(peq, popts, True)] + [(self.db.species[s][0], self.db.species[s][1], False) for s in spec["species"]]
        net = Counter()
        coef = [0.0] * 6
        for eq, opts, is_phase in parts:
            lhs, rhs = parse_equation(eq)
            for k, s in lhs:
                net[s] -= k
            for k, s in rhs:
                net[s] += k
            for i, v in enumerate(analytic_of(opts)):
                coef[i] += v
        net = {s: v for s, v in net.items() if abs(v) > 1e-12}
        assert net == spec["target"], (cid, net)
        # the copy: gas + H2O = first-parent species + H+ + second-parent species
        first, second, protons, product = self.og.combined_parts(cid)
        fa_db = DB_FAMILIES[self.dbname][fa]["species"][[s["formula"] for s in self.og.family(fa)["species"]].index(c["first"]["species"])]
        fb_db = DB_FAMILIES[self.dbname][fb]["species"][[s["formula"] for s in self.og.family(fb)["species"]].index(c["second"]["species"])]
        assert spec["target"][fa_db] == 1 and spec["target"][fb_db] == 1 and spec["target"]["H+"] == protons
        eq = f"{product} + {-spec['target']['H2O']:g} H2O = {first} + {protons:g} H+ + {second}"
        return {"key": cid, "parents": (fa, fb), "gas": c["volatile"]["gas"], "kind": "combined",
                "name": product + "(g)", "eq": eq,
                "opts": ["-analytic " + " ".join(repr(v) for v in coef)],
                "source": f"derived: {self.dbname} {spec['phase']} + " + " + ".join(spec["species"]) +
                          " formation reactions (O2 cancels)"}

    def _definitions(self) -> str:
        L = ["SOLUTION_MASTER_SPECIES"]
        for fid, spec in DB_FAMILIES[self.dbname].items():
            elem, alk = self.db.masters[spec["master"]]
            g = self.gfw("f", fid)
            L.append(f"    {COPIES[fid]['elem']} {self.copy_name[spec['master']]} {alk} {g!r} {g!r}")
        for iid, spec in DB_IONS[self.dbname].items():
            elem, alk = self.db.masters[spec["master"]]
            g = self.gfw("i", iid)
            L.append(f"    {ION_COPIES[iid]['elem']} {self.copy_name[spec['master']]} {alk} {g!r} {g!r}")
        L.append("SOLUTION_SPECIES")
        masters = [s["master"] for s in DB_FAMILIES[self.dbname].values()] + \
                  [s["master"] for s in DB_IONS[self.dbname].values()]
        for m in masters:
            c = self.copy_name[m]
            L.append(f"{c} = {c}")
            L.append("    -log_k 0")
            L += ["    " + o for o in self.master_options(m)]
        for s in self.selected:
            L.append(s["eq"])
            L += ["    " + o for o in s["opts"]]
        L.append("PHASES")
        for g in self.gas_phases():
            L.append(g["name"])
            L.append("    " + g["eq"])
            L += ["    " + o for o in g["opts"]]
        return "\n".join(L) + "\n"


# --------------------------------------------------------------------------------------
# PHREEQC input: the offgas-constants runs
# --------------------------------------------------------------------------------------
def offgas_definitions(og: Offgas) -> str:
    """offgas's model as PHREEQC input: only offgas's species, offgas's pKa/dH, Hcp(T), Kw(T);
    Davies (no -gamma) for ions, gamma = 1 (-gamma 0 0) for neutral species."""
    L = ["SOLUTION_MASTER_SPECIES"]
    for fid, cp in COPIES.items():
        master = cp["species"][-1]
        L.append(f"    {cp['elem']} {master} 0 {og.molar_mass(fid)!r} {og.molar_mass(fid)!r}")
    for iid, cp in ION_COPIES.items():
        g = float(og.ions[iid]["molar_mass"])
        L.append(f"    {cp['elem']} {cp['species']} 0 {g!r} {g!r}")
    L.append("SOLUTION_SPECIES")
    L.append("H+ = H+")
    L.append("    -log_k 0")
    a, b, c = og.kw
    L.append("H2O = OH- + H+")
    L.append(f"    -analytic {-b!r} {-c!r} {-a!r}")
    for iid, cp in ION_COPIES.items():
        L.append(f"{cp['species']} = {cp['species']}")
        L.append("    -log_k 0")
    for fid, cp in COPIES.items():
        fam = og.family(fid)
        n = len(cp["species"]) - 1
        master = cp["species"][-1]
        mel, mz = parse_formula(master)
        L.append(f"{master} = {master}")
        L.append("    -log_k 0")
        if mz == 0:
            L.append("    -gamma 0 0")
        for j in range(n):
            sp = cp["species"][j]
            el, z = parse_formula(sp)
            d_o = el.get("O", 0) - mel.get("O", 0)
            a_h = el.get("H", 0) - mel.get("H", 0) - 2 * d_o
            assert abs(mz + a_h - z) < 1e-9, (fid, sp)
            left = f"{master} + {a_h:g} H+" + (f" + {d_o:g} H2O" if d_o > 0 else "")
            right = sp + (f" + {-d_o:g} H2O" if d_o < 0 else "")
            steps = fam["steps"][j:]
            log_k = sum(float(s["pka"]) for s in steps)
            dh = -sum(float(s["dh"]) for s in steps)
            L.append(f"{left} = {right}")
            L.append("    " + _analytic_vant_hoff(log_k, dh, og))
            if z == 0:
                L.append("    -gamma 0 0")
    for cid in COMBINED_COPIES:
        if cid not in og.combined:
            continue
        first, second, protons, product = og.combined_parts(cid)
        c = og.combined[cid]
        el_p, z_p = parse_formula(product)
        el_r = parse_formula(first)[0] + parse_formula(second)[0]
        w = el_r.get("O", 0) - el_p.get("O", 0)  # water released
        assert el_r.get("H", 0) + protons - 2 * w == el_p.get("H", 0), cid
        L.append(f"{first} + {second} + {protons:g} H+ = {product}" + (f" + {w:g} H2O" if w else ""))
        L.append("    " + _analytic_vant_hoff(float(c["log_k_formation"]), float(c["dh_formation"]), og))
        if z_p == 0:
            L.append("    -gamma 0 0")
    L.append("PHASES")
    for cid in COMBINED_COPIES:
        v = og.combined.get(cid, {}).get("volatile")
        if not v:
            continue
        product = COMBINED_COPIES[cid]["formula"]
        L.append(f"{product}(g)")
        L.append(f"    {product} = {product}")
        L.append("    " + _analytic_vant_hoff(math.log10(float(v["hcp"]) * og.p_std / 1000.0),
                                           -og.r * float(v["hcp_b"]) / 1000.0, og))
    for fid, cp in COPIES.items():
        if cp["gas"] is None:
            continue
        v = og.family(fid)["volatile"]
        log_kh = math.log10(float(v["hcp"]) * og.p_std / 1000.0)
        dh = -og.r * float(v["hcp_b"]) / 1000.0  # kJ/mol for gas -> aqueous
        L.append(f"{cp['gas']}(g)")
        L.append(f"    {cp['gas']} = {cp['gas']}")
        L.append("    " + _analytic_vant_hoff(log_kh, dh, og))
    return "\n".join(L) + "\n"


# --------------------------------------------------------------------------------------
# Running a case
# --------------------------------------------------------------------------------------
def solution_block(n: int, case: dict, elem_conc: list[tuple[str, float, float]]) -> str:
    """SOLUTION with mol/L input; the density is chosen so that 1 L of liquid holds exactly
    1 kg of water (molality = molarity, offgas's convention), and -water is the liquid volume."""
    tds = sum(c * g for _, c, g in elem_conc) / 1000.0  # kg of solutes per litre
    L = [f"SOLUTION {n}", "    -units mol/l", f"    -temp {case['t']!r}",
         f"    -density {1.0 + tds!r}", f"    -water {case['vl']!r}", "    pH 7 charge"]
    for e, c, _ in elem_conc:
        L.append(f"    {e} {c!r}")
    return "\n".join(L) + "\n"


def gas_block(n: int, case: dict, phases: list[str]) -> str:
    L = [f"GAS_PHASE {n}", "    -fixed_volume", f"    -volume {case['vg']!r}",
         f"    -temperature {case['t']!r}"]
    for p in phases:
        L.append(f"    {p} 0")
    return "\n".join(L) + "\n"


class Punch:
    def __init__(self):
        self.items: list[str] = []
        self.keys: list[str] = []

    def add(self, key: str, expr: str):
        self.keys.append(key)
        self.items.append(expr)

    def block(self) -> str:
        L = ["SELECTED_OUTPUT 1", "    -reset false", "    -state true", "USER_PUNCH 1",
             "    -headings " + " ".join(f"c{i}" for i in range(len(self.items)))]
        for i in range(0, len(self.items), 4):
            L.append(f"{10 + i} PUNCH " + ", ".join(self.items[i:i + 4]))
        return "\n".join(L) + "\n"

    def rows(self, p, state: str = "react") -> list[dict]:
        so = p.GetSelectedOutput()
        states = so["state"]
        out = []
        for r, st in enumerate(states):
            if str(st).strip() != state:
                continue
            out.append({k: float(so[f"c{i}"][r]) for i, k in enumerate(self.keys)})
        return out


def _run(p, text: str) -> None:
    if p.RunString(text):
        raise RuntimeError("PHREEQC failed:\n" + p.GetErrorString() + "\n--- input ---\n" + text)


def new_phreeqc(dbname: str, definitions: str):
    p = phreeqc.Phreeqc()
    if p.LoadBuiltInDatabase(dbname):
        raise RuntimeError(p.GetErrorString())
    _run(p, definitions + "END\n")
    return p


def run_database_case(setup: DbSetup, p, case: dict) -> dict:
    og = setup.og
    fams = DB_FAMILIES[setup.dbname]
    elem_conc = []
    for fid, c in case["families"].items():
        if fid not in fams:
            raise ValueError(f"{case['id']}: {setup.dbname} has no {fid} setup")
        elem_conc.append((COPIES[fid]["elem"], c, og.molar_mass(fid)))
    for iid, c in case.get("ions", {}).items():
        elem_conc.append((ION_COPIES[iid]["elem"], c, float(og.ions[iid]["molar_mass"])))
    present = {("f", f) for f in case["families"]} | {("i", i) for i in case.get("ions", {})}
    gases = [g for g in setup.gas_phases() if all(f in case["families"] for f in g["parents"])]
    # species of this run: those whose components are all present
    species = [s for s in setup.selected if s["comps"] <= present]
    pu = Punch()
    pu.add("ph", '-LA("H+")')
    pu.add("mu", "MU")
    pu.add("water", 'TOT("water")')
    pu.add("lk:OH-", 'LK_SPECIES("OH-")')
    for e, _, _ in elem_conc:
        pu.add(f"tot:{e}", f'TOT("{e}")')
    masters = {fams[f]["master"] for f in case["families"]} | {DB_IONS[setup.dbname][i]["master"] for i in case.get("ions", {})}
    for m in sorted(masters):
        pu.add(f"mol:{m}", f'MOL("{setup.copy_name[m]}")')
    for s in species:
        pu.add(f"mol:{s['db']}", f'MOL("{s["copy"]}")')
        pu.add(f"lk:{s['db']}", f'LK_SPECIES("{s["copy"]}")')
    for g in gases:
        k, name = g["key"], g["name"]
        pu.add(f"si:{k}", f'SI("{name}")')
        pu.add(f"phi:{k}", f'PR_PHI("{name}")')
        pu.add(f"gas:{k}", f'GAS("{name}")')
        pu.add(f"lkp:{k}", f'LK_PHASE("{name}")')
    text = solution_block(1, case, elem_conc) + gas_block(1, case, [g["name"] for g in gases]) + pu.block() + "END\n"
    _run(p, text)
    rows = pu.rows(p)
    assert len(rows) == 1, rows
    r = rows[0]
    # mass-balance check: liquid + gas totals equal the input
    for fid, c in case["families"].items():
        liquid = r[f"tot:{COPIES[fid]['elem']}"] * r["water"]
        gas_mol = sum(r[f"gas:{g['key']}"] for g in gases if fid in g["parents"])
        assert abs(liquid + gas_mol - c * case["vl"]) <= 1e-6 * c * case["vl"], (case["id"], fid, liquid, gas_mol)
    for iid, c in case.get("ions", {}).items():
        liquid = r[f"tot:{ION_COPIES[iid]['elem']}"] * r["water"]
        assert abs(liquid - c * case["vl"]) <= 1e-6 * c * case["vl"], (case["id"], iid)
    # constants at the case temperature, rewritten in terms of the master species
    kf = {m: 0.0 for m in masters}
    kf.update({"H+": 0.0, "H2O": 0.0, "OH-": r["lk:OH-"]})
    for s in species:
        eq, _ = setup.db.species[s["db"]]
        lhs, rhs = parse_equation(eq)
        kf[s["db"]] = r[f"lk:{s['db']}"] + sum(c * kf[x] for c, x in lhs) - sum(c * kf[x] for c, x in rhs[1:])
    consts = {"log_kw": r["lk:OH-"], "pka": {}, "log_kh": {}, "log_k_gas_to_parents": {}}
    for fid in case["families"]:
        sp = fams[fid]["species"]
        consts["pka"][fid] = [
            (kf[sp[j]] - kf[sp[j + 1]]) if (sp[j] is not None and sp[j + 1] is not None) else None
            for j in range(len(sp) - 1)
        ]
    gases_atm = {}
    gas_moles = {}
    for g in gases:
        k = g["key"]
        if g["kind"] == "family":
            fid = k
            lhs, rhs = parse_equation(setup.db.phases[fams[fid]["gas"]][0])
            lk = r[f"lkp:{k}"] - sum(c * kf[x] for c, x in rhs) + sum(c * kf[x] for c, x in lhs[1:])
            vi = og.volatile_index(fid)
            consts["log_kh"][fid] = lk + kf[fams[fid]["species"][vi]]
        elif g["kind"] == "added":  # from offgas's data, written gas = neutral species
            consts["log_kh"][k] = r[f"lkp:{k}"]
        else:  # combined: gas + H2O = parents' species + H+, as written
            consts["log_k_gas_to_parents"][k] = r[f"lkp:{k}"]
        phi = r[f"phi:{k}"] or 1.0
        gases_atm[g["gas"]] = 10 ** r[f"si:{k}"] / phi
        gas_moles[k] = r[f"gas:{k}"]
    # species shares per family (liquid), for materiality
    shares = {}
    conc = {m: r[f"mol:{m}"] for m in masters}
    conc.update({s["db"]: r[f"mol:{s['db']}"] for s in species})
    for fid in case["families"]:
        elem = fams[fid]["elem"]
        tot = r[f"tot:{COPIES[fid]['elem']}"]
        comp = ("f", fid)
        fam_species = [fams[fid]["master"]] + [s["db"] for s in species if comp in s["comps"]]
        sh = {}
        for s in fam_species:
            el, _ = parse_formula(s)
            sh[s] = el.get(elem, 0) * conc[s] / tot if tot > 0 else 0.0
        shares[fid] = sh
    return {
        "ph": r["ph"], "ionic_strength": r["mu"], "gases_atm": gases_atm,
        "gas_moles": gas_moles, "constants": consts, "shares": shares,
        "species": sorted({s["db"] for s in species}),
        "gas_sources": {g["gas"]: g["source"] for g in gases},
    }


def offgas_punch_and_input(og: Offgas, cases: list[dict], first_number: int = 1, lean: bool = False):
    """One PHREEQC input for several cases (offgas-constants setup) and its punch layout.
    `lean` punches only pH, ionic strength and the gases' saturation indices (for timing)."""
    pu = Punch()
    pu.add("ph", '-LA("H+")')
    pu.add("mu", "MU")
    if not lean:
        pu.add("lk:OH-", 'LK_SPECIES("OH-")')
        pu.add("gamma:H+", 'GAMMA("H+")')
    for fid, cp in COPIES.items():
        if cp["gas"]:
            pu.add(f"si:{fid}", f'SI("{cp["gas"]}(g)")')
        if lean:
            continue
        pu.add(f"tot:{fid}", f'TOT("{cp["elem"]}")')
        for s in cp["species"]:
            pu.add(f"mol:{fid}:{s}", f'MOL("{s}")')
        if cp["gas"]:
            pu.add(f"gas:{fid}", f'GAS("{cp["gas"]}(g)")')
            pu.add(f"lkp:{fid}", f'LK_PHASE("{cp["gas"]}(g)")')
        for s in cp["species"][:-1]:
            pu.add(f"lk:{fid}:{s}", f'LK_SPECIES("{s}")')
    for cid in COMBINED_COPIES:
        if cid not in og.combined:
            continue
        product = COMBINED_COPIES[cid]["formula"]
        has_gas = bool(og.combined[cid].get("volatile"))
        if has_gas:
            pu.add(f"si:{cid}", f'SI("{product}(g)")')
        if lean:
            continue
        pu.add(f"mol:{cid}", f'MOL("{product}")')
        pu.add(f"lk:{cid}", f'LK_SPECIES("{product}")')
        if has_gas:
            pu.add(f"gas:{cid}", f'GAS("{product}(g)")')
            pu.add(f"lkp:{cid}", f'LK_PHASE("{product}(g)")')
    if not lean:
        pu.add("water", 'TOT("water")')
    parts = [pu.block()]
    for k, case in enumerate(cases):
        n = first_number + k
        if not any(COPIES[f]["gas"] for f in case["families"]):
            raise ValueError(f"{case['id']}: no volatile family, so no gas phase and no reaction step")
        elem_conc = [(COPIES[f]["elem"], c, og.molar_mass(f)) for f, c in case["families"].items()]
        elem_conc += [(ION_COPIES[i]["elem"], c, float(og.ions[i]["molar_mass"])) for i, c in case.get("ions", {}).items()]
        phases = [COPIES[f]["gas"] + "(g)" for f in case["families"] if COPIES[f]["gas"]]
        phases += [COMBINED_COPIES[c]["formula"] + "(g)" for c in og.combined_in(case["families"])
                   if og.combined[c].get("volatile")]
        parts.append(solution_block(n, case, elem_conc))
        parts.append(gas_block(n, case, phases))
        parts.append("END\n")
    return pu, "".join(parts)


def offgas_result(og: Offgas, case: dict, r: dict) -> dict:
    t_k = case["t"] + og.t0
    gases_atm, gas_moles, shares = {}, {}, {}
    for fid in case["families"]:
        cp = COPIES[fid]
        tot = r[f"tot:{fid}"]
        shares[fid] = {s: (r[f"mol:{fid}:{s}"] / tot if tot > 0 else 0.0) for s in cp["species"]}
        if cp["gas"]:
            gases_atm[og.gas(fid)] = 10 ** r[f"si:{fid}"]
            gas_moles[fid] = r[f"gas:{fid}"]
    combined = {}
    for cid in og.combined_in(case["families"]):
        c = og.combined[cid]
        fa, fb = c["first"]["family"], c["second"]["family"]
        combined[cid] = {fa: r[f"mol:{cid}"] / r[f"tot:{fa}"], fb: r[f"mol:{cid}"] / r[f"tot:{fb}"]}
        if c.get("volatile"):
            gases_atm[c["volatile"]["gas"]] = 10 ** r[f"si:{cid}"]
            gas_moles[cid] = r[f"gas:{cid}"]
        assert abs(r[f"lk:{cid}"] - og.log_kf_combined(cid, t_k)) < 1e-9, (case["id"], cid)
        if c.get("volatile"):
            assert abs(r[f"lkp:{cid}"] - og.log_kh_combined(cid, t_k)) < 1e-9, (case["id"], cid)
    # the constants PHREEQC used must be offgas's (checks the -analytic set-up and its signs)
    assert abs(r["lk:OH-"] - og.log_kw(t_k)) < 1e-9, (case["id"], r["lk:OH-"], og.log_kw(t_k))
    for fid in case["families"]:
        cp = COPIES[fid]
        n = len(cp["species"]) - 1
        for j, s in enumerate(cp["species"][:-1]):
            want = sum(-og.log_ka(fid, i, t_k) for i in range(j, n))
            assert abs(r[f"lk:{fid}:{s}"] - want) < 1e-9, (case["id"], s)
        if cp["gas"]:
            assert abs(r[f"lkp:{fid}"] - og.log_kh(fid, t_k)) < 1e-9, (case["id"], fid)
    return {"ph": r["ph"], "ionic_strength": r["mu"], "gases_atm": gases_atm,
            "gas_moles": gas_moles, "shares": shares, "combined_shares": combined}


def run_offgas_cases(og: Offgas, p, cases: list[dict]) -> list[dict]:
    pu, text = offgas_punch_and_input(og, cases)
    _run(p, text)
    rows = pu.rows(p)
    assert len(rows) == len(cases), (len(rows), len(cases))
    return [offgas_result(og, case, r) for case, r in zip(cases, rows)]


# --------------------------------------------------------------------------------------
# Comparison of constants and materiality
# --------------------------------------------------------------------------------------
def compare(og: Offgas, case: dict, dbr: dict, ogr: dict) -> list[dict]:
    t_k = case["t"] + og.t0
    fams = DB_FAMILIES[case["database"]]
    diffs = []

    def add(what, offgas_value, db_value, material, why):
        diffs.append({"what": what, "offgas": offgas_value, "database": db_value,
                      "material": material, "why": why})

    pkw_og, pkw_db = -og.log_kw(t_k), -dbr["constants"]["log_kw"]
    if abs(pkw_og - pkw_db) > TOL_LOGK:
        # OH- takes part in the charge balance only above pH ~5 (below, [OH-] < 1e-9 mol/L)
        in_play = max(dbr["ph"], ogr["ph"]) > KW_IN_PLAY_PH
        add(f"pKw at {case['t']:g} °C", pkw_og, pkw_db, in_play,
            "differs by more than 0.02" + ("" if in_play else f"; not in play below pH {KW_IN_PLAY_PH:g}"))
    for fid in case["families"]:
        cp = COPIES[fid]
        dbsp = fams[fid]["species"]
        vi = og.volatile_index(fid)
        gas_in_both = cp["gas"] is not None and fid in dbr["constants"]["log_kh"]
        for j in range(len(cp["species"]) - 1):
            pka_og = -og.log_ka(fid, j, t_k)
            pka_db = dbr["constants"]["pka"][fid][j]
            a, b = og.family(fid)["species"][j]["formula"], og.family(fid)["species"][j + 1]["formula"]
            what = f"{fid} pKa{j + 1} ({a}/{b}) at {case['t']:g} °C"
            in_play = min(ogr["shares"][fid][cp["species"][j]], ogr["shares"][fid][cp["species"][j + 1]]) >= STEP_IN_PLAY
            if dbsp[j] is not None and dbsp[j + 1] is not None:
                in_play = in_play or min(dbr["shares"][fid].get(dbsp[j], 0), dbr["shares"][fid].get(dbsp[j + 1], 0)) >= STEP_IN_PLAY
            if vi is not None and vi in (j, j + 1) and gas_in_both:
                in_play = True
            if pka_db is None:
                sp_missing = cp["species"][j] if dbsp[j] is None else cp["species"][j + 1]
                share = ogr["shares"][fid][sp_missing]
                add(what, pka_og, None, share > SHARE_MATERIAL,
                    f"the database has no {a if dbsp[j] is None else b}; offgas puts {share:.2g} of the family in it")
            elif abs(pka_og - pka_db) > TOL_LOGK:
                add(what, pka_og, pka_db, in_play,
                    "differs by more than 0.02" + ("" if in_play else "; step not in play in this case (a species below 0.1 %)"))
        if cp["gas"] is not None:
            gas = og.gas(fid)
            kh_og = og.log_kh(fid, t_k)
            kh_db = dbr["constants"]["log_kh"].get(fid)
            what = f"{gas} log10 Hcp (mol/(kg atm)) at {case['t']:g} °C"
            if kh_db is None:
                frac = ogr["gas_moles"][fid] / (case["families"][fid] * case["vl"])
                add(what, kh_og, None, frac > GAS_MOLES_MATERIAL,
                    f"the database has no {gas} gas; with offgas's constant the headspace holds {frac:.2g} of the family")
            elif abs(kh_og - kh_db) > TOL_LOGK:
                add(what, kh_og, kh_db, True, "differs by more than 0.02")
    # species of the database run that offgas does not model
    modelled = set()
    for fid in case["families"]:
        modelled |= {s for s in fams[fid]["species"] if s}
    for fid, sh in dbr["shares"].items():
        for s, v in sh.items():
            if s in modelled:
                continue
            add(f"species {s} (database only) share of {fid}", 0.0, v, v > SHARE_MATERIAL,
                "ion pair, dimer or complex offgas does not model")
    # species formed from two families (dissolved chlorine)
    for cid in og.combined_in(case["families"]):
        c = og.combined[cid]
        fa, fb = c["first"]["family"], c["second"]["family"]
        formula = c["formula"]
        share = max(ogr["combined_shares"][cid].values())
        # the database has no dissolved form of any combined species set up here
        add(f"species {formula}(aq) (offgas only) share of {fa}/{fb}", max(ogr["combined_shares"][cid].values()),
            None, share > SHARE_MATERIAL, f"the database has no dissolved {formula}; offgas puts "
            f"{ogr['combined_shares'][cid][fa]:.2g} of {fa} and {ogr['combined_shares'][cid][fb]:.2g} of {fb} in it")
        if c.get("volatile"):
            gas = c["volatile"]["gas"]
            k_og = og.log_kh_combined(cid, t_k) - og.log_kf_combined(cid, t_k)
            k_db = dbr["constants"]["log_k_gas_to_parents"].get(cid)
            what = (f"log K of {gas}(g) + H2O = {c['first']['species']} + H+ + {c['second']['species']} "
                    f"at {case['t']:g} °C")
            if k_db is None:
                frac = ogr["gas_moles"][cid] / (min(case["families"][fa], case["families"][fb]) * case["vl"])
                add(what, k_og, None, frac > GAS_MOLES_MATERIAL, f"the database has no {gas} gas")
            elif abs(k_og - k_db) > TOL_LOGK:
                add(what, k_og, k_db, True, "differs by more than 0.02")
    return diffs


def ion_pairs_in(case: dict, dbr: dict) -> list[str]:
    modelled = set()
    for fid in case["families"]:
        modelled |= {s for s in DB_FAMILIES[case["database"]][fid]["species"] if s}
    return [s for s in dbr["species"] if s not in modelled]


# --------------------------------------------------------------------------------------
# Notes written into golden.json
# --------------------------------------------------------------------------------------
NOTES = [
    "Reference: PHREEQC (IPhreeqc through the `phreeqc` Python package) with databases shipped in that package. Each case is solved twice: `database_result` uses the case's database; `offgas_constants_result` uses offgas's own constants (data/species.yaml). `reference` names the one offgas is held to: the database run when the constants agree, else the offgas-constants run.",
    "No redox: a sealed waste container over hours is not in redox equilibrium, but a PHREEQC batch run would put every valence state of an element in equilibrium. Every family is therefore a non-reacting copy of the database's species, with an element name of our own (Cbn carbonate, Sfd sulfide, Sft sulfite, Sfa sulfate, Amn ammonia, Ntr nitrate, Flr fluoride, Chl chloride, Phs phosphate, Act acetate, Cyn cyanide; Sod for Na+, Pot for K+). Equations and every option (log_k, delta_h, -analytic, activity parameters, volumes, critical constants) are copied unchanged from the database; only element symbols are renamed. A species is copied when the database forms it, without electrons or O2, from the family's master species, H+, H2O, OH- and the other components of the case; the master species themselves get an identity reaction with their activity options. This removes e.g. sulfite disproportionation, oxidation of ammonium by sulfate, polysulfides and CH4.",
    "Ion pairs and other species offgas does not model are kept in the database run when the database defines them for the case's components (the list per database is in the next note); each case lists those present in `database_species_not_in_offgas`, and names in `differences` those holding more than 1 % of a family. Counter-ions were chosen to avoid pairs where the database allows: phreeqc.dat has no Na+ or K+ pair with sulfide, ammonia or chloride and none of K+ with fluoride (its K+ pair with bicarbonate, KHCO3, is weaker than NaHCO3); minteq.v4.dat has none with cyanide or chloride. The offgas-constants run has none of them.",
    "Polysulfides in minteq.v4.dat (HS- = S2-2 + H+ etc., written with -no_check, i.e. unbalanced, implicitly assuming elemental sulfur) are left out: a copied reaction must balance in elements and charge.",
    "llnl.dat defines dissolved SO2 twice (SO2 and H2SO3, with nearly the same constant), which counts SO2.H2O twice and halves the SO2 pressure; H2SO3 is left out of the llnl.dat runs and SO2 kept (SO2(g) is written against SO2).",
    "HF: phreeqc.dat and minteq.v4.dat carry aqueous HF but no HF gas, so HF gas cases use llnl.dat. In llnl.dat `Hf(g)` (hafnium) overwrites `HF(g)` because phase names are case-insensitive; the HF(g) entry is copied under its own name (HFlr(g)). The H2F2 dimer (log K 6.768 for 2 H+ + 2 F- = H2F2) and HF2- are kept in the llnl.dat database run because they are part of that database. {hf_detail} offgas models neither; HF cases are compared with the offgas-constants run (their constants differ anyway). phreeqc.dat's aqueous HF (with HF2-) is used in one case whose gas is compared with the offgas-constants run only.",
    "HCl: llnl.dat has HCl(g) (HCl = Cl- + H+, log K 6.31) and molecular HCl(aq) (log K -0.67), offgas a pKa of -6.25 with Hcp 1.1e-2 mol/(m3 Pa): the products Ka*Hcp agree (log 6.30 against 6.31) but the split does not, so HCl cases are compared with the offgas-constants run. phreeqc.dat and minteq.v4.dat have no HCl gas; phreeqc.dat has HCl(aq) (log K -0.46 at 25 °C from its analytic expression), minteq.v4.dat none.",
    "Cl2: offgas computes dissolved chlorine as a species drawing on two families (data/combined.yaml: HOCl + H+ + Cl- = Cl2 + H2O, with a Henry constant). Without redox this is set up with two copy elements, Hpc for hypochlorite chlorine and Chl for chloride chlorine, and Cl2 written as HpcChl: with no reaction that exchanges chlorine between valence states, the two mass balances are exact and match offgas's (Cl2 takes one from each family). None of the databases has dissolved Cl2; llnl.dat has Cl2(g) only through O2 (Cl2(g) + H2O = 0.5 O2 + 2 Cl- + 2 H+), ClO- through O2 (Cl- + 0.5 O2 = ClO-) and HClO from ClO-. The database runs use the sum of those three llnl.dat reactions, in which O2 cancels exactly (the script checks the sum): Cl2(g) + H2O = HClO + H+ + Cl-, as a gas phase over the copied HClO/ClO- and Cl- species. Without dissolved Cl2 in llnl.dat, those database runs put all chlorine gas in the headspace and none in the liquid, so the Cl2 cases are compared with the offgas-constants run, which tests offgas's coupled two-family solution.",
    "Cyanide: minteq.v4.dat carries aqueous cyanide (HCyanide, pKa 9.21, dH 43.63 kJ/mol) as its own master species but no HCN gas; an HCN(g) phase was added to the minteq.v4.dat (and llnl.dat, which also has aqueous cyanide but no HCN gas) database runs from offgas's Henry's law constant (data/species.yaml: Hcp {hcn_hcp} mol/(m3 Pa), hcp_b {hcn_b} K), so those cases test offgas against minteq.v4.dat's aqueous constants with offgas's Henry constant.",
    "Units: input is mol/L (`-units mol/l`). PHREEQC converts to molality with the density: m = c / (rho - solutes). Each SOLUTION sets rho = 1 + solutes (kg/L) so that 1 L of liquid holds exactly 1 kg of water and molality equals offgas's molarity numerically; `-water` is the liquid volume in kg, so the moles are c * V_liquid. This is offgas's own dilute-solution convention; a real 0.5 M NaCl solution holds about 0.99 kg of water per litre (density near 1.018 kg/L; memory), so at the highest ionic strengths the true molalities are about 1 % higher than used here (a few thousandths in pH).",
    "Headspace: GAS_PHASE -fixed_volume equal to the headspace, at the case temperature, every gas of the case's families starting at zero partial pressure, no water vapour and no air (offgas counts neither). The totals count liquid and gas: PHREEQC starts with everything in the liquid and lets the gas take its share, the same mass balance as offgas (N = V_l C_aq + p V_g / RT); the script checks that liquid + gas moles equal the input.",
    "Partial pressures are 10^SI(phase) / PR_PHI(phase) (fugacity over the fugacity coefficient). phreeqc.dat's gases carry critical constants, so its database runs use a Peng-Robinson gas phase, whose reported total pressure has a floor near 2e-3 atm; the fugacity route avoids it. Gases without critical constants (llnl.dat, minteq.v4.dat, and all offgas-constants runs) are ideal: PR_PHI = 1.",
    "Temperature: in the database runs PHREEQC uses each reaction's own -analytic or log_k/delta_h. In the offgas-constants runs every constant is an -analytic expression reproducing offgas exactly: log K(T) = log K(298.15) - dH/(R ln 10) (1/T - 1/298.15) with offgas's R for each protonation step, log10 Hcp(T) = log10 Hcp + hcp_b/ln 10 (1/T - 1/298.15) for each gas, and log Kw = -(a/T + b + c T) from the water family's kw_equation. Hcp in mol/(m3 Pa) becomes mol/(kg atm) by x 101325/1000; the gas = aqueous reaction has dH = -R hcp_b (exothermic dissolution: more soluble when cold). The script checks the log K values PHREEQC reports (LK_SPECIES, LK_PHASE) against offgas's formulas at each case temperature to 1e-9.",
    "Activity: the offgas-constants runs define every ion without -gamma, which in PHREEQC means Davies (log gamma = -A z^2 (sqrt I/(1 + sqrt I) - 0.3 I)), and every neutral species with -gamma 0 0 (gamma = 1, as offgas; PHREEQC's default would be log gamma = 0.1 I). They load phreeqc.dat as host for H2O/H+/OH- (whose constants and activity options are replaced) because llnl.dat's b-dot model gives gamma = 1 to species defined without -llnl_gamma. What still differs from offgas in those runs: PHREEQC's Debye-Hueckel A(T) comes from its own water properties (top-level `debye_huckel_a`: {a_table}); the activity of water is 1 - 0.017 sum(m) in PHREEQC and 1 in offgas (about 0.983 at I = 0.5, i.e. Kw and reactions written with H2O shift by up to 0.008 in log); PHREEQC's ionic strength counts H+ and OH- like offgas's. The database runs use each database's own activity model (phreeqc.dat and minteq.v4.dat: WATEQ Debye-Hueckel -gamma parameters where given, Davies otherwise, neutral species 0.1 I or their -gamma b; llnl.dat: b-dot).",
    "Constants compared (`differences`): pKw, each protonation step's pKa and each gas's log10 Hcp at the case temperature, with a tolerance of 0.02; for the database these are taken from PHREEQC's own log K at the case temperature (LK_SPECIES, LK_PHASE), rewritten in terms of the master species. A difference is `material` when it can move the case's numbers: a pKa whose two species each hold at least 0.1 % of the family in either run, or whose step involves the volatile species when both runs have its gas; any Henry constant both runs have; a species one side lacks holding more than 1 % of its family; a gas the database lacks holding more than 0.1 % of its family in the offgas-constants run; a pKw difference where either run's pH is above 5 (below, OH- does not enter the charge balance). `constants_agree` is true when no difference is material, and only then is the database run the reference.",
    "Results are those of PHREEQC's batch-reaction step (the solution after its gas phase has equilibrated); the initial-solution step only sets the charge balance on H+ (`pH 7 charge`), which fixes the protonation implied by the family totals and strong ions exactly as offgas's charge balance does.",
    "The offgas-constants runs include a gas phase for every volatile family offgas has (including HCl, HNO3 and acetic acid, with offgas's Henry constants), so their gas lists are offgas's.",
    "Hand checks asserted by the script: 0.01 M NaHS + 0.02 M HCl, 1 L liquid under 1 L headspace at 25 °C gives p(H2S) = 0.01/(Hcp + 1/RT) = 0.070 atm in both runs (at pH 2 all sulfide is H2S); 0.1 M acetic acid gives pH 2.88 in both runs; every Henry constant is larger at 10 °C than at 40 °C.",
    "A gas the database has no phase for is absent from `database_result.gases_atm`; offgas's value for it is then checked only where the reference is the offgas-constants run.",
]


def davies_a_table(og: Offgas, p) -> dict:
    """Debye-Hueckel A of PHREEQC's Davies branch (from gamma(H+) in the offgas-constants
    set-up, 0.1 M of a 1:1 salt) and offgas's, at 10, 25 and 40 °C."""
    out = {}
    for t in (10.0, 25.0, 40.0):
        case = {"t": t, "vl": 1.0}
        pu = Punch()
        pu.add("mu", "MU")
        pu.add("g", 'GAMMA("H+")')
        elems = [(ION_COPIES["Na+"]["elem"], 0.1, float(og.ions["Na+"]["molar_mass"])),
                 (COPIES["chloride"]["elem"], 0.1, og.molar_mass("chloride"))]
        _run(p, solution_block(1, case, elems) + pu.block() + "END\n")
        (r,) = pu.rows(p, state="i_soln")
        s = math.sqrt(r["mu"])
        a_phreeqc = -math.log10(r["g"]) / (s / (1 + s) - 0.3 * r["mu"])
        out[f"{t:g}"] = {"phreeqc": a_phreeqc, "offgas": og.debye_huckel_a(t + og.t0)}
    return out


def sanity_checks(og: Offgas, doc: dict) -> None:
    """Hand cases that pin the sign conventions (fail loudly if a convention flips)."""
    cases = {c["id"]: c for c in doc["cases"]}
    # 0.01 M NaHS + 0.02 M HCl, 1 L + 1 L, 25 °C: at pH 2 all sulfide is H2S, split between
    # liquid (Hcp p) and gas (p V/RT): p = 0.01 / (Hcp + 1/RT) = about 0.070 atm.
    c = cases["pdat_h2s_hand_check"]
    kh = 10 ** og.log_kh("sulfide", 298.15)
    rt = og.r * 298.15 / og.p_std * 1000.0  # L atm / mol
    hand = 0.01 / (kh + 1.0 / rt)
    for which in ("offgas_constants_result", "database_result"):
        p = c[which]["gases_atm"]["H2S"]
        assert 0.065 < p < 0.075, (which, p)
    assert abs(c["offgas_constants_result"]["gases_atm"]["H2S"] / hand - 1) < 0.01, hand
    # 0.1 M acetic acid: pH about 2.88 (pKa 4.756)
    c = cases["llnl_acetic_acid_hand_check"]
    for which in ("offgas_constants_result", "database_result"):
        assert abs(c[which]["ph"] - 2.88) < 0.02, (which, c[which]["ph"])
    # gases dissolve better when cold: Hcp(10 °C) > Hcp(40 °C) in both set-ups
    for c in doc["cases"]:
        for gas, v in c["constants_at_case_temperature"]["log10_hcp_mol_per_kg_atm"].items():
            assert v["offgas"] is not None
    for fid in COPIES:
        if og.log_kh(fid, 283.15) is not None:
            assert og.log_kh(fid, 283.15) > og.log_kh(fid, 313.15), fid


def build_notes(og: Offgas, setups: dict, cases: list[dict], a_table: dict) -> list[str]:
    """NOTES, with the numbers that depend on the runs filled in."""
    by_id = {c["id"]: c for c in cases}
    hf = by_id.get("llnl_hf_acid")
    if hf:
        share = next((d["database"] for d in hf["differences"] if d["what"].startswith("species H2F2")), None)
        p_db = hf["database_result"]["gases_atm"]["HF"]
        p_og = hf["offgas_constants_result"]["gases_atm"]["HF"]
        hf_detail = (f"In case llnl_hf_acid (0.05 M fluoride, pH near 2) H2F2 holds {share:.0%} of the "
                     f"fluoride and the database's HF pressure is {p_db / p_og - 1:+.0%} against the "
                     f"offgas-constants run (dimer, HF2- and the different Henry constant together).")
    else:
        hf_detail = ""
    ts = sorted(a_table, key=float)
    a_ph = "/".join(f"{a_table[t]['phreeqc']:.4f}" for t in ts)
    a_og = "/".join(f"{a_table[t]['offgas']:.4f}" for t in ts)
    a_text = f"{a_ph} at {'/'.join(ts)} °C against offgas's {a_og}"
    hcn = og.family("cyanide")["volatile"]
    fill = {"{hf_detail}": hf_detail, "{a_table}": a_text,
            "{hcn_hcp}": f"{float(hcn['hcp']):g}", "{hcn_b}": f"{float(hcn['hcp_b']):g}"}
    notes = []
    for n in NOTES:
        for k, v in fill.items():
            n = n.replace(k, v)
        notes.append(n)
    pairs = []
    for db, s in sorted(setups.items()):
        found = [x["db"] for x in s.selected if any(k == "i" for k, _ in x["comps"])]
        other = [x["db"] for x in s.selected
                 if not any(k == "i" for k, _ in x["comps"]) and
                 x["db"] not in {sp for f in DB_FAMILIES[db].values() for sp in f["species"] if sp}]
        pairs.append(f"{db}: with Na+/K+: {', '.join(found) or 'none'}; other species beyond offgas's: "
                     f"{', '.join(other) or 'none'}")
    notes.insert(3, "Species each database forms from the families and ions set up here (copied into its "
                 "database runs when the case has the components): " + "; ".join(pairs) + ".")
    return notes


# --------------------------------------------------------------------------------------
# Building the document
# --------------------------------------------------------------------------------------
def _clean(x):
    """Plain JSON values (floats stay floats)."""
    if isinstance(x, dict):
        return {str(k): _clean(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, float):
        if not math.isfinite(x):
            raise ValueError("non-finite number")
        return x
    return x


def compute() -> dict:
    og = Offgas()
    _check_copies(og)
    ids = [c["id"] for c in CASES]
    assert len(ids) == len(set(ids)), "duplicate case ids"
    setups = {}
    db_instances = {}
    for db in sorted({c["database"] for c in CASES}):
        setups[db] = DbSetup(db, og)
        db_instances[db] = new_phreeqc(db, setups[db].definitions)
    p_og = new_phreeqc(OFFGAS_HOST_DB, offgas_definitions(og))
    og_results = run_offgas_cases(og, p_og, CASES)
    out_cases = []
    for case, ogr in zip(CASES, og_results):
        setup = setups[case["database"]]
        dbr = run_database_case(setup, db_instances[case["database"]], case)
        diffs = compare(og, case, dbr, ogr)
        agree = not any(d["material"] for d in diffs)
        vsum = case["vl"] + case["vg"]
        t_k = case["t"] + og.t0
        out_cases.append({
            "id": case["id"],
            "description": case["description"],
            "database": case["database"],
            "temperature_c": case["t"],
            "liquid_l": case["vl"],
            "headspace_l": case["vg"],
            "headspace_fraction": case["vg"] / vsum,
            "families": dict(case["families"]),
            "ions": dict(case.get("ions", {})),
            "database_result": {"ph": dbr["ph"], "ionic_strength": dbr["ionic_strength"],
                                "gases_atm": dbr["gases_atm"]},
            "offgas_constants_result": {"ph": ogr["ph"], "ionic_strength": ogr["ionic_strength"],
                                        "gases_atm": ogr["gases_atm"]},
            "database_gas_phases": dbr["gas_sources"],
            "database_species_not_in_offgas": ion_pairs_in(case, dbr),
            "constants_at_case_temperature": {
                "pkw": {"offgas": -og.log_kw(t_k), "database": -dbr["constants"]["log_kw"]},
                "pka": {f: {"offgas": [-og.log_ka(f, j, t_k) for j in range(len(COPIES[f]["species"]) - 1)],
                            "database": [None if v is None else v for v in dbr["constants"]["pka"][f]]}
                        for f in case["families"]},
                "log10_hcp_mol_per_kg_atm": {og.gas(f): {"offgas": og.log_kh(f, t_k),
                                                        "database": dbr["constants"]["log_kh"].get(f)}
                                             for f in case["families"] if COPIES[f]["gas"]},
            },
            **({"combined_species_constants_at_case_temperature": {
                og.combined[cid]["formula"]: {
                    "log_k_formation_offgas": og.log_kf_combined(cid, t_k),
                    "log10_hcp_mol_per_kg_atm_offgas": og.log_kh_combined(cid, t_k),
                    "log_k_gas_to_parents": {
                        "offgas": (og.log_kh_combined(cid, t_k) - og.log_kf_combined(cid, t_k))
                        if og.log_kh_combined(cid, t_k) is not None else None,
                        "database": dbr["constants"]["log_k_gas_to_parents"].get(cid)},
                } for cid in og.combined_in(case["families"])}}
               if og.combined_in(case["families"]) else {}),
            "constants_agree": agree,
            "differences": diffs,
            "reference": "database" if agree else "offgas_constants",
        })
    a_table = davies_a_table(og, p_og)
    dbs_used = sorted({c["database"] for c in CASES} | {OFFGAS_HOST_DB})
    doc = {
        "generator": GENERATOR,
        "phreeqc_package_version": _pkg_version("phreeqc"),
        "iphreeqc_version": phreeqc.Phreeqc.GetVersionString(),
        "databases": dbs_used,
        "offgas_constants_host_database": OFFGAS_HOST_DB,
        "units": {"concentrations": "mol per litre of liquid, liquid + gas", "volumes": "L",
                  "temperature": "°C", "gases_atm": "partial pressure, atm",
                  "ionic_strength": "mol/kg water (= mol/L here, see notes)"},
        "notes": build_notes(og, setups, out_cases, a_table),
        "debye_huckel_a": a_table,
        "cases": out_cases,
    }
    doc = _clean(doc)
    sanity_checks(og, doc)
    return doc


def dumps(doc: dict) -> str:
    return json.dumps(doc, sort_keys=True, indent=1, ensure_ascii=False) + "\n"


def diff_docs(now, committed, path="", out=None, rel=1e-9):
    """Differences between a fresh run and the committed document: numbers beyond `rel`
    relative, anything else unequal, keys or cases present on one side only."""
    if out is None:
        out = []
    a, b = now, committed
    if isinstance(a, dict) and isinstance(b, dict):
        for k in sorted(set(a) | set(b)):
            if k not in a:
                out.append(f"{path}/{k}: only in golden.json (not produced any more)")
            elif k not in b:
                out.append(f"{path}/{k}: only in the fresh run (missing from golden.json)")
            else:
                diff_docs(a[k], b[k], f"{path}/{k}", out, rel)
    elif isinstance(a, list) and isinstance(b, list):
        keyed = all(isinstance(x, dict) and "id" in x for x in a + b)
        if keyed:
            ia, ib = {x["id"]: x for x in a}, {x["id"]: x for x in b}
            for k in [x["id"] for x in b if x["id"] not in ia]:
                out.append(f"{path}[{k}]: case only in golden.json")
            for k in [x["id"] for x in a if x["id"] not in ib]:
                out.append(f"{path}[{k}]: case only in the fresh run")
            if [x["id"] for x in a if x["id"] in ib] != [x["id"] for x in b if x["id"] in ia]:
                out.append(f"{path}: cases in a different order")
            for k in ia:
                if k in ib:
                    diff_docs(ia[k], ib[k], f"{path}[{k}]", out, rel)
        else:
            if len(a) != len(b):
                out.append(f"{path}: {len(b)} items in golden.json, {len(a)} in the fresh run")
            for i, (x, y) in enumerate(zip(a, b)):
                diff_docs(x, y, f"{path}[{i}]", out, rel)
    elif isinstance(a, bool) or isinstance(b, bool) or a is None or b is None:
        if a != b:
            out.append(f"{path}: golden.json {b!r}, fresh run {a!r}")
    elif isinstance(a, (int, float)) and isinstance(b, (int, float)):
        if a != b and abs(a - b) > rel * max(abs(a), abs(b)):
            out.append(f"{path}: golden.json {b!r}, fresh run {a!r} (relative {abs(a - b) / max(abs(a), abs(b)):.2e})")
    elif a != b:
        out.append(f"{path}: golden.json {b!r}, fresh run {a!r}")
    return out


def summary_line(doc: dict) -> str:
    cases = doc["cases"]
    n_db = sum(1 for c in cases if c["reference"] == "database")
    gases = sorted({g for c in cases for g in c[f"{c['reference']}_result"]["gases_atm"]})
    return (f"{len(cases)} cases ({n_db} against the database, {len(cases) - n_db} against "
            f"offgas's constants), databases {', '.join(doc['databases'])}, gases {', '.join(gases)}")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--check", action="store_true",
                    help="recompute and compare with the committed golden.json (exit 1 on any difference)")
    ap.add_argument("--output", type=Path, default=GOLDEN, help="where to write (default: golden.json here)")
    args = ap.parse_args(argv)
    if _pkg_version("phreeqc") != PINNED_PACKAGE_VERSION:
        print(f"warning: phreeqc {_pkg_version('phreeqc')} installed, golden.json is made with "
              f"{PINNED_PACKAGE_VERSION} (tests/reference/requirements.txt)", file=sys.stderr)
    doc = compute()
    if args.check:
        if not GOLDEN.exists():
            print(f"check: {GOLDEN} is missing")
            return 1
        committed = json.loads(GOLDEN.read_text(encoding="utf-8"))
        diffs = diff_docs(doc, committed)
        for d in diffs:
            print("differs:", d)
        if diffs:
            print(f"check FAILED: {len(diffs)} difference(s) between golden.json and a fresh run; {summary_line(doc)}")
            return 1
        print(f"check ok: golden.json reproduced within 1e-9 relative; {summary_line(doc)}")
        return 0
    args.output.write_text(dumps(doc), encoding="utf-8")
    print(f"wrote {args.output}: {summary_line(doc)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
