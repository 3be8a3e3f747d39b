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

And concentrated mixtures (ionic strength 1-6 mol/kg, `CONC_CASES`, marked by an
`activity_model`), entered per kg of water with the native species of PHREEQC's pitzer.dat or
sit.dat, each solved as `database_result` (the database) and `offgas_parameters_result`
(PHREEQC's Pitzer equations with offgas's constants, pair parameters and salting-out); see the
section "Concentrated solutions" below and tests/reference/README.md.

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
# Concentrated solutions (ionic strength 1-6 mol/kg): PHREEQC's Pitzer and SIT databases
# --------------------------------------------------------------------------------------
# These cases are entered in mol per kg of water (1 kg), with the databases' native species
# (their activity parameters are attached to species names), and solved two ways:
#   database_result            pitzer.dat or sit.dat as shipped, except that single-ion
#                              activities are reported on the unscaled Pitzer convention
#                              (PITZER -MacInnes false), offgas's; pitzer.dat's own
#                              MacInnes-scaled pH is kept beside it as ph_macinnes;
#   offgas_parameters_result   PHREEQC's Pitzer equations with offgas's constants, offgas's
#                              own ion-interaction parameters (data/pitzer.yaml, binary terms
#                              only, no mixing terms, no unsymmetrical-mixing terms), its NH3
#                              self-interaction and its salting-out of dissolved gases
#                              (data/salting-out.yaml), so that PHREEQC computes offgas's model.
# tests/reference_concentrated.rs holds offgas to the second closely (the same model) and to
# the first within a per-case tolerance: the base where the two share their parameters, else
# widened by PHREEQC's own gap between the two runs.
CONC_BASE_TOL = {"ph": 0.1, "gas_relative": 0.15, "fraction": 0.05}
CONC_GAS_FLOOR_ATM = 1e-9  # gases below this are not compared (tests/reference_concentrated.rs)
CONC_PRESENT_MOLALITY = 1e-3  # a species counts as present (its parameters in play) above this
CONC_FAMILY_SHARE = 0.01  # ... or above this share of its family
CONC_PARAM_REL = 0.02  # parameters differing by more than this (or CONC_PARAM_ABS) are named
CONC_PARAM_ABS = 0.002
CONC_TOL_LOGK = 0.02

# Per database: how each offgas family and strong ion is entered (element or valence state),
# the database species in offgas's order (None where the database has none), other species
# of the family the database forms (their share is recorded), and the gas phase: its name and
# whether it is the database's or added from offgas's constants.
CONC_DB = {
    "pitzer.dat": {
        "model": "pitzer",
        "families": {
            "carbonate": {"input": "C", "element": "C", "species": ["CO2", "HCO3-", "CO3-2"],
                          "others": ["MgCO3"], "gas": ("CO2(g)", "database")},
            "sulfate": {"input": "S", "element": "S", "species": ["HSO4-", "SO4-2"], "others": []},
            "chloride": {"input": "Cl", "element": "Cl", "species": [None, "Cl-"], "others": [],
                         "gas": ("HCl(g)", "added")},
            # pitzer.dat's sulfide is its own element Sg (H2Sg, HSg-), not coupled to sulfate
            "sulfide": {"input": "Sg", "element": "Sg", "species": ["H2Sg", "HSg-", None],
                        "others": ["(H2Sg)2"], "gas": ("H2Sg(g)", "database")},
        },
        "ions": {"Na+": ("Na", "Na+"), "K+": ("K", "K+"), "Ca^2+": ("Ca", "Ca+2"), "Mg^2+": ("Mg", "Mg+2")},
    },
    "sit.dat": {
        "model": "sit",
        "families": {
            "ammonia": {"input": "N(-3)", "element": "N", "species": ["NH4+", "NH3"], "others": [],
                        "gas": ("NH3(g)", "added")},
            "sulfide": {"input": "S(-2)", "element": "S", "species": ["H2S", "HS-", "S-2"],
                        "others": ["S2-2"], "gas": ("H2S(g)", "database")},
            "chloride": {"input": "Cl", "element": "Cl", "species": [None, "Cl-"], "others": [],
                         "gas": ("HCl(g)", "database")},
        },
        "ions": {"Na+": ("Na", "Na+"), "K+": ("K", "K+")},
        "redox_traces": ["H(0)", "O(0)"],
    },
}
# Databases whose gases carry critical constants (Peng-Robinson gas phase), and the critical
# constants given to a gas added to them (memory: HCl Tc 324.7 K, Pc 83.1 bar, acentric factor
# 0.13; they set the fugacity coefficient, within 1e-3 of 1 at these partial pressures).
CONC_PR_DATABASES = {"pitzer.dat"}
CONC_CRITICAL = {"HCl": "-T_c 324.7; -P_c 82.0; -Omega 0.13"}
# phreeqc.dat computes the liquid volume of the SIT cases (sit.dat carries no molar volumes
# of aqueous species, so its SOLN_VOL is that of the water alone): how each family is entered.
CONC_VOLUME_DB = "phreeqc.dat"
CONC_VOLUME_INPUT = {"ammonia": "N(-3)", "sulfide": "S(-2)", "chloride": "Cl", "carbonate": "C(4)",
                     "sulfate": "S(6)", "Na+": "Na", "K+": "K", "Ca^2+": "Ca", "Mg^2+": "Mg"}

# The PHREEQC names offgas's species take in the offgas-parameters runs (pitzer.dat's names,
# so that the parameters of both runs are written alike); element symbols there.
OG_NATIVE = {
    "water": {"elem": None, "names": {"H2O": "H2O", "OH-": "OH-"}},
    "carbonate": {"elem": "C", "names": {"CO2": "CO2", "HCO3-": "HCO3-", "CO3^2-": "CO3-2"}},
    "sulfate": {"elem": "S", "names": {"HSO4-": "HSO4-", "SO4^2-": "SO4-2"}},
    "chloride": {"elem": "Cl", "names": {"HCl": "HCl", "Cl-": "Cl-"}},
    "sulfide": {"elem": "Sg", "names": {"H2S": "H2Sg", "HS-": "HSg-", "S^2-": "Sg-2"}},
    "ammonia": {"elem": "N", "names": {"NH4+": "NH4+", "NH3": "NH3"}},
}
OG_NATIVE_IONS = {"H+": "H+", "Na+": "Na+", "K+": "K+", "Ca^2+": "Ca+2", "Mg^2+": "Mg+2"}

CONC_CASES = [
    # ---- pitzer.dat: brines with carbonate partly acidified (CO2 in the headspace) ----
    dict(id="pz_nacl_1m_bicarbonate_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.05, "chloride": 1.025}, ions={"Na+": 1.05},
         description="NaCl 1 mol/kg brine with NaHCO3 0.05 mol/kg half neutralised by HCl: "
                     "pH near 6.4, CO2 in a 1 L headspace (I near 1)."),
    dict(id="pz_nacl_3m_carbonate_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.05, "chloride": 3.07}, ions={"Na+": 3.1},
         description="NaCl 3 mol/kg brine with Na2CO3 0.05 mol/kg and HCl 0.07 mol/kg: "
                     "bicarbonate/CO2 buffer, CO2 in the headspace (I near 3)."),
    dict(id="pz_nacl_5m_bicarbonate_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.05, "chloride": 5.02}, ions={"Na+": 5.05},
         description="NaCl 5 mol/kg (near saturation) with NaHCO3 0.05 and HCl 0.02 mol/kg: "
                     "CO2 over a concentrated brine (I near 5)."),
    dict(id="pz_nacl_3m_bicarbonate_40c", database="pitzer.dat", t=40.0, vg=0.5,
         molality={"carbonate": 0.05, "chloride": 3.03}, ions={"Na+": 3.05},
         description="NaCl 3 mol/kg with NaHCO3 0.05 and HCl 0.03 mol/kg at 40 °C: the "
                     "temperature dependence of the parameters (I near 3)."),
    dict(id="pz_cacl2_1_5m_bicarbonate_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.02, "chloride": 3.01}, ions={"Ca^2+": 1.5, "Na+": 0.02},
         description="CaCl2 1.5 mol/kg brine with NaHCO3 0.02 and HCl 0.01 mol/kg: CO2 over "
                     "a 2:1 brine (I near 4.5)."),
    dict(id="pz_mgcl2_1_5m_bicarbonate_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.02, "chloride": 3.01}, ions={"Mg^2+": 1.5, "Na+": 0.02},
         description="MgCl2 1.5 mol/kg brine with NaHCO3 0.02 and HCl 0.01 mol/kg: CO2 over "
                     "a 2:1 brine with magnesium carbonate complexing (I near 4.5)."),
    # ---- pitzer.dat: spent hydrochloric acid with salt (HCl gas from offgas's constant) ----
    dict(id="pz_hcl_1m", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"chloride": 1.0}, ions={},
         description="Hydrochloric acid 1 mol/kg: pH and HCl over the acid; pitzer.dat has no "
                     "HCl gas, so HCl(g) = H+ + Cl- is added from offgas's Ka*Hcp (I = 1)."),
    dict(id="pz_hcl_3m_nacl_1m", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"chloride": 4.0}, ions={"Na+": 1.0},
         description="Spent pickling acid: HCl 3 mol/kg with NaCl 1 mol/kg; HCl gas (I = 4)."),
    dict(id="pz_hcl_5m_kcl_1m", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"chloride": 6.0}, ions={"K+": 1.0},
         description="HCl 5 mol/kg with KCl 1 mol/kg: HCl gas over strong acid (I = 6)."),
    # ---- pitzer.dat: sulfuric acid (HSO4-/SO4 2- speciation) ----
    dict(id="pz_h2so4_1m", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"sulfate": 1.0}, ions={},
         description="Sulfuric acid 1 mol/kg: pH and the HSO4-/SO4 2- split; no volatile "
                     "species, so the results are those of the solution alone."),
    dict(id="pz_h2so4_3m_nacl_1m", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"sulfate": 3.0, "chloride": 1.0}, ions={"Na+": 1.0},
         description="Sulfuric acid 3 mol/kg poured on NaCl 1 mol/kg: HCl released from the "
                     "salt by the acid; HSO4- holds most of the sulfate."),
    # ---- pitzer.dat: caustic with carbonate (pH; CO2 far below the gas floor) ----
    dict(id="pz_naoh_2m_carbonate", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.2}, ions={"Na+": 2.4},
         description="NaOH 2 mol/kg that has taken up CO2 (Na2CO3 0.2 mol/kg): pH of a "
                     "concentrated caustic (I near 2.6)."),
    dict(id="pz_koh_4m_carbonate", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.5}, ions={"K+": 5.0},
         description="KOH 4 mol/kg with K2CO3 0.5 mol/kg: pH of a concentrated caustic (I near 5.5)."),
    # ---- pitzer.dat: sulfate brine with bicarbonate ----
    dict(id="pz_na2so4_1_5m_bicarbonate_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"carbonate": 0.1, "sulfate": 1.525}, ions={"Na+": 3.1},
         description="Na2SO4 1.5 mol/kg brine with NaHCO3 0.1 mol/kg and H2SO4 0.025 mol/kg: "
                     "CO2 over a sulfate brine (I near 4.6)."),
    # ---- pitzer.dat: sulfide acidified in brine (H2S; salting out) ----
    dict(id="pz_nacl_2m_sulfide_acid", database="pitzer.dat", t=25.0, vg=1.0,
         molality={"sulfide": 0.05, "chloride": 2.08}, ions={"Na+": 2.05},
         description="NaHS 0.05 mol/kg in NaCl 2 mol/kg with HCl in excess: nearly all sulfide "
                     "as H2S, shared between the brine and the headspace (I near 2)."),
    # ---- sit.dat: ammonium brines (NH3 gas added from offgas's Henry constant), sulfide, HCl ----
    dict(id="sit_nh4cl_4m_naoh", database="sit.dat", t=25.0, vg=1.0,
         molality={"ammonia": 4.0, "chloride": 4.0}, ions={"Na+": 0.4},
         description="NH4Cl 4 mol/kg with NaOH 0.4 mol/kg: ammonia buffer near pH 8.6 in an "
                     "ammonium brine; NH3 in the headspace (I near 4)."),
    dict(id="sit_ammonia_1m_nacl_3m", database="sit.dat", t=25.0, vg=1.0,
         molality={"ammonia": 1.2, "chloride": 3.2}, ions={"Na+": 3.0},
         description="Ammonia 1 mol/kg with NH4Cl 0.2 mol/kg in NaCl 3 mol/kg: NH3 over an "
                     "alkaline brine (I near 3.2)."),
    dict(id="sit_nacl_2m_sulfide_acid", database="sit.dat", t=25.0, vg=1.0, pe=1.5,
         molality={"sulfide": 0.05, "chloride": 2.08}, ions={"Na+": 2.05},
         description="NaHS 0.05 mol/kg in NaCl 2 mol/kg with HCl in excess, in the SIT model: "
                     "nearly all sulfide as H2S, in the brine and the headspace (I near 2); the "
                     "same mixture as pz_nacl_2m_sulfide_acid."),
    dict(id="sit_hcl_3m_nacl_1m", database="sit.dat", t=25.0, vg=1.0,
         molality={"chloride": 4.0}, ions={"Na+": 1.0},
         description="HCl 3 mol/kg with NaCl 1 mol/kg in the SIT model, with sit.dat's own HCl "
                     "gas (I = 4); the same mixture as pz_hcl_3m_nacl_1m."),
]


def _signed_side(text: str) -> list[tuple[float, str]]:
    """One side of a reaction with '+' and '-' between terms ('- H+ + H2O', '2 H+ + CO3-2 - H2O')."""
    out, sign, coef = [], 1.0, None
    for tok in text.split():
        if tok in ("+", "-"):
            sign = 1.0 if tok == "+" else -1.0
            continue
        if re.fullmatch(r"\d+(?:\.\d+)?|\.\d+", tok):
            coef = float(tok)
            continue
        m = _COEF.match(tok)
        if m and not tok[0].isalpha():
            out.append((sign * float(m.group(1)), m.group(2)))
        else:
            out.append((sign * (coef if coef is not None else 1.0), tok))
        coef, sign = None, 1.0
    return out


def _signed_equation(eq: str):
    lhs, rhs = eq.split("=", 1)
    return _signed_side(lhs), _signed_side(rhs)


def read_pitzer_block(dbname: str) -> dict:
    """Every parameter of a database's PITZER block at 25 °C (the first coefficient of PHREEQC's
    temperature expression): {(kind, species...): value}; kinds B0, B1, B2, C0, THETA, LAMDA,
    ZETA, PSI. Pairs are keyed as a frozenset, triples likewise."""
    sizes = {"B0": 2, "B1": 2, "B2": 2, "C0": 2, "THETA": 2, "LAMDA": 2, "LAMBDA": 2, "ZETA": 3, "PSI": 3}
    out, block, inside = {}, None, False
    for raw in (DBDIR / dbname).read_text(encoding="latin-1").splitlines():
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        first = line.split()[0]
        if not raw[0].isspace() and first.upper() in KEYWORDS:
            inside = first.upper() == "PITZER"
            block = None
            continue
        if not inside:
            continue
        if first.startswith("-"):
            word = first[1:].upper()
            block = ("LAMDA" if word == "LAMBDA" else word) if word in sizes else None
            continue
        if block is None:
            continue
        parts = line.split()
        n = sizes[block]
        try:
            value = float(parts[n])
        except (IndexError, ValueError):
            continue
        out[(block, frozenset(parts[:n]) if len(set(parts[:n])) == n else tuple(parts[:n]))] = value
    return out


def offgas_pitzer_pairs(og: Offgas) -> list[dict]:
    """offgas's cation-anion parameters (data/pitzer.yaml) in PHREEQC names, for the ions the
    offgas-parameters runs define."""
    data = yaml.safe_load((ROOT / "data" / "pitzer.yaml").read_text(encoding="utf-8"))
    names = dict(OG_NATIVE_IONS)
    for f in OG_NATIVE.values():
        names.update(f["names"])
    out = []
    for p in data["pairs"]:
        c, a = names.get(p["cation"]), names.get(p["anion"])
        if c is None or a is None:
            continue
        out.append({"cation": c, "anion": a, "beta0": float(p.get("beta0", 0.0)),
                    "beta1": float(p.get("beta1", 0.0)), "beta2": float(p.get("beta2", 0.0)),
                    "c_phi": float(p.get("c_phi", 0.0)),
                    "alpha1": p.get("alpha1"), "alpha2": p.get("alpha2")})
    return out


def offgas_neutral_lambdas(og: Offgas) -> list[tuple[str, list[float]]]:
    """offgas's self-interaction of neutral volatile species, lambda = a + b/T + c/T^2, as
    PHREEQC's LAMDA expression A0 + A1 (1/T - 1/TR) + ... + A5 (1/T^2 - 1/TR^2), TR = 298.15 K."""
    out = []
    for fid, spec in OG_NATIVE.items():
        v = og.family(fid).get("volatile") if fid != "water" else None
        si = (v or {}).get("self_interaction")
        if not si:
            continue
        a, b, c = float(si["a"]), float(si["b"]), float(si["c"])
        tr = 298.15
        name = spec["names"][v["species"]]
        out.append((name, [a + b / tr + c / tr ** 2, b, 0.0, 0.0, 0.0, c]))
    return out


SALTING_YAML = ROOT / "data" / "salting-out.yaml"


def offgas_salting() -> dict | None:
    """offgas's salting-out parameters of dissolved neutral gases (Weisenberger-Schumpe form,
    log10 gamma = sum over the ions of (h_i + h_G) c_i, c_i in mol/L of liquid), or None when
    the data file is absent."""
    if not SALTING_YAML.exists():
        return None
    data = yaml.safe_load(SALTING_YAML.read_text(encoding="utf-8"))
    return {"ions": {e["ion"]: float(e["h"]) for e in data["ions"]},
            "gases": {e["species"]: (float(e["h_g0"]), float(e.get("h_t", 0.0))) for e in data["gases"]},
            "unlisted": (float(data["unlisted_gas"]["h_g0"]), 0.0)}


def offgas_salting_lambdas(og: Offgas, case: dict, liquid_l: float, water_kg: float) -> list[tuple[str, str, float]]:
    """offgas's salting-out as Pitzer lambda terms for one case: ln gamma(n) = ln 10 sum (h_i + h_G)
    c_i = 2 sum lambda(n, i) m_i, with c_i = m_i water_kg / liquid_l, so lambda(n, i) =
    ln 10 (h_i + h_G) (water_kg / liquid_l) / 2, for every ion the case can hold (its strong ions,
    H+, OH- and its families' charged species; an ion without h counts h = 0, as in offgas)."""
    salt = offgas_salting()
    if salt is None:
        return []
    t_k = case["t"] + og.t0
    ions = [("H+", "H+"), ("OH-", "OH-")] + [(i, OG_NATIVE_IONS[i]) for i in case["ions"]]
    for f in case["molality"]:
        for sp in og.family(f)["species"]:
            if sp["charge"] != 0:
                ions.append((sp["formula"], OG_NATIVE[f]["names"][sp["formula"]]))
    out = []
    for f in case["molality"]:
        v = og.family(f).get("volatile")
        if not v or og.family(f)["species"][og.volatile_index(f)]["charge"] != 0:
            continue
        h_g0, h_t = salt["gases"].get(v["species"], salt["unlisted"])
        h_g = h_g0 + h_t * (t_k - og.t_ref)
        neutral = OG_NATIVE[f]["names"][v["species"]]
        for formula, name in ions:
            lam = math.log(10) * (salt["ions"].get(formula, 0.0) + h_g) * (water_kg / liquid_l) / 2
            out.append((neutral, name, lam))
    return out


def offgas_pitzer_database(og: Offgas) -> str:
    """A PHREEQC database holding offgas's model for the concentrated cases: offgas's species,
    constants (pKa, dH, Kw(T), Henry's law constants) and Pitzer parameters; no ion pairs, no
    mixing terms, no unsymmetrical-mixing (E-theta) terms, unscaled single-ion activities."""
    L = ["SOLUTION_MASTER_SPECIES",
         "    E e- 0 0 0", "    H H+ -1 H 1.008", "    H(1) H+ -1 0",
         "    O H2O 0 O 16.0", "    O(-2) H2O 0 0"]
    for fid, spec in OG_NATIVE.items():
        if spec["elem"] is None:
            continue
        fam = og.family(fid)
        master = spec["names"][fam["species"][-1]["formula"]]
        L.append(f"    {spec['elem']} {master} 0 {og.molar_mass(fid)!r} {og.molar_mass(fid)!r}")
    for iid, name in OG_NATIVE_IONS.items():
        if iid == "H+":
            continue
        g = float(og.ions[iid]["molar_mass"])
        L.append(f"    {split_charge(name)[0]} {name} 0 {g!r} {g!r}")
    L += ["SOLUTION_SPECIES", "H+ = H+", "    -log_k 0", "e- = e-", "    -log_k 0",
          "H2O = H2O", "    -log_k 0"]
    a, b, c = og.kw
    L += ["H2O = OH- + H+", f"    -analytic {-b!r} {-c!r} {-a!r}"]
    for iid, name in OG_NATIVE_IONS.items():
        if iid != "H+":
            L += [f"{name} = {name}", "    -log_k 0"]
    for fid, spec in OG_NATIVE.items():
        if spec["elem"] is None:
            continue
        fam = og.family(fid)
        forms = [s["formula"] for s in fam["species"]]
        master = spec["names"][forms[-1]]
        mel, mz = parse_formula(master)
        L += [f"{master} = {master}", "    -log_k 0"]
        for j in range(len(forms) - 1):
            sp = spec["names"][forms[j]]
            el, z = parse_formula(sp)
            d_o = el.get("O", 0) - mel.get("O", 0)
            a_h = el.get("H", 0) - mel.get("H", 0) - 2 * d_o
            assert abs(mz + a_h - z) < 1e-9, (fid, sp)
            left = f"{master} + {a_h:g} H+" + (f" + {d_o:g} H2O" if d_o > 0 else "")
            right = sp + (f" + {-d_o:g} H2O" if d_o < 0 else "")
            steps = fam["steps"][j:]
            L.append(f"{left} = {right}")
            L.append("    " + _analytic_vant_hoff(sum(float(s["pka"]) for s in steps),
                                                   -sum(float(s["dh"]) for s in steps), og))
    L.append("PHASES")
    for fid, spec in OG_NATIVE.items():
        v = og.family(fid).get("volatile") if fid != "water" else None
        if not v:
            continue
        neutral = spec["names"][v["species"]]
        L += [f"{neutral}(g)", f"    {neutral} = {neutral}",
              "    " + _analytic_vant_hoff(math.log10(float(v["hcp"]) * og.p_std / 1000.0),
                                         -og.r * float(v["hcp_b"]) / 1000.0, og)]
    L += ["PITZER", "    -MacInnes false", "    -use_etheta false"]
    pairs = offgas_pitzer_pairs(og)
    for block, key in (("-B0", "beta0"), ("-B1", "beta1"), ("-B2", "beta2"), ("-C0", "c_phi")):
        rows = [f"    {p['cation']} {p['anion']} {p[key]!r}" for p in pairs if p[key] != 0.0]
        if rows:
            L += [block] + rows
    alphas = [p for p in pairs if p["alpha1"] is not None or p["alpha2"] is not None]
    if alphas:
        L.append("-ALPHAS")
        for p in alphas:
            zc, za = abs(split_charge(p["cation"])[1]), abs(split_charge(p["anion"])[1])
            a1 = p["alpha1"] if p["alpha1"] is not None else (1.4 if zc == za == 2 else 2.0)
            a2 = p["alpha2"] if p["alpha2"] is not None else 12.0
            L.append(f"    {p['cation']} {p['anion']} {float(a1)!r} {float(a2)!r}")
    lambdas = offgas_neutral_lambdas(og)
    if lambdas:
        L.append("-LAMDA")
        for name, coef in lambdas:
            L.append(f"    {name} {name} " + " ".join(repr(x) for x in coef))
    return "\n".join(L) + "\nEND\n"


def _conc_solution(case: dict, inputs: list[tuple[str, float]], pe: float | None = None) -> str:
    L = ["SOLUTION 1", "    -units mol/kgw", f"    -temp {case['t']!r}", "    -water 1", "    pH 7 charge"]
    if pe is not None:
        L.append(f"    pe {pe!r}")
    L += [f"    {e} {c!r}" for e, c in inputs]
    return "\n".join(L) + "\n"


def _conc_gas(case: dict, phases: list[str]) -> str:
    if not phases:
        return ""
    return gas_block(1, {"vg": case["vg"], "t": case["t"]}, phases)


def conc_database_definitions(dbname: str, og: Offgas) -> str:
    """Gas phases added to a concentrated-case database from offgas's constants, where the
    database has none."""
    L = ["PHASES"]
    for fid, spec in CONC_DB[dbname]["families"].items():
        gas = spec.get("gas")
        if not gas or gas[1] != "added":
            continue
        v = og.family(fid)["volatile"]
        log_kh = math.log10(float(v["hcp"]) * og.p_std / 1000.0)
        dh_gas = -og.r * float(v["hcp_b"]) / 1000.0
        neutral = spec["species"][og.volatile_index(fid)]
        if neutral is not None:  # gas = the database's neutral species
            L += [gas[0], f"    {neutral} = {neutral}", "    " + _analytic_vant_hoff(log_kh, dh_gas, og)]
        else:  # the database has no neutral form (HCl): gas = its ions, with offgas's Ka*Hcp
            n = len(spec["species"]) - 1
            log_ka = -sum(float(s["pka"]) for s in og.family(fid)["steps"])
            dh = dh_gas + sum(float(s["dh"]) for s in og.family(fid)["steps"])
            assert n == 1, fid
            L += [gas[0], f"    {og.gas(fid)} = H+ + {spec['species'][-1]}",
                  "    " + _analytic_vant_hoff(log_kh + log_ka, dh, og)]
        if dbname in CONC_PR_DATABASES:
            # a database whose gases carry critical constants runs a Peng-Robinson gas phase,
            # which every gas of the phase then needs
            L.append("    " + CONC_CRITICAL[og.gas(fid)])
    return "\n".join(L) + "\n" if len(L) > 1 else ""


def run_conc_database(og: Offgas, p, dbname: str, case: dict) -> dict:
    """One concentrated case in its database (native species), batch reaction with the gas phase
    (or the solution alone when no family is volatile)."""
    setup = CONC_DB[dbname]
    fams = setup["families"]
    inputs = [(fams[f]["input"], m) for f, m in case["molality"].items()]
    inputs += [(setup["ions"][i][0], m) for i, m in case["ions"].items()]
    gases = [(f, fams[f]["gas"][0]) for f in case["molality"] if fams[f].get("gas")]
    pu = Punch()
    for k, expr in (("ph", '-LA("H+")'), ("mu", "MU"), ("water", 'TOT("water")'), ("aw", 'ACT("H2O")'),
                    ("osmotic", "OSMOTIC"), ("vol", "SOLN_VOL"), ("pe", '-LA("e-")'),
                    ("lk:OH-", 'LK_SPECIES("OH-")')):
        pu.add(k, expr)
    species_seen = []
    for f in case["molality"]:
        spec = fams[f]
        pu.add(f"tot:{f}", f'TOT("{spec["input"]}")')
        pu.add(f"el:{f}", f'TOT("{spec["element"]}")')
        for s in [x for x in spec["species"] if x] + spec["others"]:
            if s not in species_seen:
                species_seen.append(s)
                pu.add(f"mol:{s}", f'MOL("{s}")')
                pu.add(f"lk:{s}", f'LK_SPECIES("{s}")')
    for i in case["ions"]:
        pu.add(f"tot:{i}", f'TOT("{setup["ions"][i][0]}")')
        name = setup["ions"][i][1]
        if name not in species_seen:
            species_seen.append(name)
            pu.add(f"mol:{name}", f'MOL("{name}")')
    for s in ("H+", "OH-"):
        pu.add(f"mol:{s}", f'MOL("{s}")')
    for f, g in gases:
        pu.add(f"si:{f}", f'SI("{g}")')
        pu.add(f"phi:{f}", f'PR_PHI("{g}")')
        pu.add(f"gas:{f}", f'GAS("{g}")')
        pu.add(f"lkp:{f}", f'LK_PHASE("{g}")')
        neutral = fams[f]["species"][og.volatile_index(f)]
        if neutral:
            pu.add(f"gamma:{f}", f'GAMMA("{neutral}")')
    for e in setup.get("redox_traces", []):
        pu.add(f"trace:{e}", f'TOT("{e}")')
    text = _conc_solution(case, inputs, case.get("pe")) + _conc_gas(case, [g for _, g in gases]) + pu.block() + "END\n"
    _run(p, text)
    (r0,) = pu.rows(p, state="i_soln")
    rows = pu.rows(p, state="react") if gases else [r0]
    assert len(rows) == 1, (case["id"], len(rows))
    r = rows[0]
    return _conc_result(case, r, r0, gases, fams, dbname)


def _conc_result(case, r, r0, gases, fams, dbname) -> dict:
    """Checks a run (mass balance, no redox) and collects its numbers."""
    cid = case["id"]
    for f, m in case["molality"].items():
        gas_mol = r.get(f"gas:{f}", 0.0)
        liquid = r[f"tot:{f}"] * r["water"]
        assert abs(liquid + gas_mol - m) <= 1e-6 * m, (cid, dbname, f, liquid, gas_mol, m)
        # no other valence state of the element formed (no redox in the run)
        assert abs(r[f"el:{f}"] - r[f"tot:{f}"]) <= 1e-9 * r[f"tot:{f}"], (cid, dbname, f, "redox")
    for i, m in case["ions"].items():
        assert abs(r[f"tot:{i}"] * r["water"] - m) <= 1e-6 * m, (cid, dbname, i)
    shares = {}
    for f in case["molality"]:
        spec = fams[f]
        elem = spec["element"]
        tot = r[f"tot:{f}"]
        sh = {}
        for s in [x for x in spec["species"] if x] + spec["others"]:
            n = parse_formula(s)[0].get(elem, 0)
            sh[s] = n * r[f"mol:{s}"] / tot
        rest = 1.0 - sum(sh.values())
        assert abs(rest) < 1e-4, (cid, dbname, f, "species not accounted for", rest, sh)
        shares[f] = sh
    for key, v in r.items():
        if key.startswith("trace:"):  # H(0), O(0): no water split or formed in the run
            assert v < 1e-6, (cid, dbname, key, v)
    gases_atm, gas_moles, gamma = {}, {}, {}
    for f, _ in gases:
        phi = r[f"phi:{f}"] or 1.0
        gases_atm[f] = 10 ** r[f"si:{f}"] / phi
        gas_moles[f] = r[f"gas:{f}"]
        if f"gamma:{f}" in r:
            gamma[f] = r[f"gamma:{f}"]
    return {"ph": r["ph"], "ionic_strength": r["mu"], "water_activity": r["aw"],
            "osmotic_coefficient": r["osmotic"], "water_kg": r["water"], "pe": r["pe"],
            "volume_l": r["vol"], "initial_volume_l": r0["vol"], "gases": gases_atm,
            "gas_moles": gas_moles, "neutral_gamma": gamma, "shares": shares, "raw": r}


def run_conc_offgas_parameters(og: Offgas, db_text: str, case: dict, liquid_l: float, water_kg: float) -> dict:
    """One concentrated case in offgas's model computed by PHREEQC's Pitzer equations (a fresh
    PHREEQC for each case: the salting-out lambdas depend on the case's liquid volume)."""
    p = phreeqc.Phreeqc()
    if p.LoadDatabaseString(db_text):
        raise RuntimeError(p.GetErrorString())
    lambdas = offgas_salting_lambdas(og, case, liquid_l, water_kg)
    if lambdas:
        _run(p, "PITZER\n-LAMDA\n" + "".join(f"    {n} {i} {v!r}\n" for n, i, v in lambdas) + "END\n")
    fams = {}
    for fid in case["molality"]:
        spec = OG_NATIVE[fid]
        forms = [s["formula"] for s in og.family(fid)["species"]]
        fams[fid] = {"input": spec["elem"], "element": spec["elem"],
                     "species": [spec["names"][x] for x in forms], "others": []}
        v = og.family(fid).get("volatile")
        if v:
            fams[fid]["gas"] = (spec["names"][v["species"]] + "(g)", "offgas")
    ions = {i: (split_charge(OG_NATIVE_IONS[i])[0], OG_NATIVE_IONS[i]) for i in case["ions"]}
    inputs = [(fams[f]["input"], m) for f, m in case["molality"].items()]
    inputs += [(ions[i][0], m) for i, m in case["ions"].items()]
    gases = [(f, fams[f]["gas"][0]) for f in case["molality"] if fams[f].get("gas")]
    pu = Punch()
    for k, expr in (("ph", '-LA("H+")'), ("mu", "MU"), ("water", 'TOT("water")'), ("aw", 'ACT("H2O")'),
                    ("osmotic", "OSMOTIC"), ("vol", "SOLN_VOL"), ("pe", '-LA("e-")'),
                    ("lk:OH-", 'LK_SPECIES("OH-")')):
        pu.add(k, expr)
    for f in case["molality"]:
        pu.add(f"tot:{f}", f'TOT("{fams[f]["input"]}")')
        pu.add(f"el:{f}", f'TOT("{fams[f]["element"]}")')
        for s in fams[f]["species"]:
            pu.add(f"mol:{s}", f'MOL("{s}")')
    for i in case["ions"]:
        pu.add(f"tot:{i}", f'TOT("{ions[i][0]}")')
    for f, g in gases:
        pu.add(f"si:{f}", f'SI("{g}")')
        pu.add(f"phi:{f}", f'PR_PHI("{g}")')
        pu.add(f"gas:{f}", f'GAS("{g}")')
        pu.add(f"lkp:{f}", f'LK_PHASE("{g}")')
        pu.add(f"gamma:{f}", f'GAMMA("{fams[f]["species"][og.volatile_index(f)]}")')
    text = _conc_solution(case, inputs) + _conc_gas(case, [g for _, g in gases]) + pu.block() + "END\n"
    _run(p, text)
    (r0,) = pu.rows(p, state="i_soln")
    rows = pu.rows(p, state="react") if gases else [r0]
    assert len(rows) == 1, (case["id"], len(rows))
    r = rows[0]
    t_k = case["t"] + og.t0
    assert abs(r["lk:OH-"] - og.log_kw(t_k)) < 1e-9, case["id"]
    for f, _ in gases:
        assert abs(r[f"lkp:{f}"] - og.log_kh(f, t_k)) < 1e-9, (case["id"], f)
    return _conc_result(case, r, r0, gases, fams, "offgas parameters")


def conc_liquid_volume(p_vol, case: dict) -> float:
    """Liquid volume (L) of the SIT cases' solution as made up, from phreeqc.dat's molar volumes."""
    pu = Punch()
    pu.add("vol", "SOLN_VOL")
    inputs = [(CONC_VOLUME_INPUT[f], m) for f, m in case["molality"].items()]
    inputs += [(CONC_VOLUME_INPUT[i], m) for i, m in case["ions"].items()]
    _run(p_vol, _conc_solution(case, inputs) + pu.block() + "END\n")
    (r,) = pu.rows(p_vol, state="i_soln")
    return r["vol"]


_EQ_CACHE: dict[str, tuple[dict, dict]] = {}


def conc_equations(dbname: str) -> tuple[dict, dict]:
    """Reaction equations of a database's SOLUTION_SPECIES (keyed by the species defined) and
    PHASES (keyed by phase name). Unlike Database, this accepts equations that begin with a
    minus sign ('- H+ + HS- = S-2', as sit.dat writes them), told apart from options ('-log_k')
    by the space after the sign."""
    if dbname in _EQ_CACHE:
        return _EQ_CACHE[dbname]
    species, phases, section, phase = {}, {}, None, None
    for raw in (DBDIR / dbname).read_text(encoding="latin-1").splitlines():
        line = raw.split("#", 1)[0].rstrip()
        if not line.strip():
            continue
        first = line.split()[0]
        if not line[0].isspace() and first.upper() in KEYWORDS:
            section = first.upper()
            continue
        s = line.strip()
        is_eq = "=" in s and not re.match(r"-[A-Za-z]", s)
        if section == "SOLUTION_SPECIES" and is_eq:
            lhs, rhs = _signed_equation(s)
            species[rhs[0][1]] = s
        elif section == "PHASES":
            if is_eq:
                if phase is not None and phase not in phases:
                    phases[phase] = s
            elif not s.startswith("-") and _optname(s) not in PHASE_OPTIONS:
                phase = s.split()[0]
    _EQ_CACHE[dbname] = (species, phases)
    return species, phases


def conc_database_constants(og: Offgas, dbname: str, case: dict, dbr: dict) -> dict:
    """The database's pKw, pKa of each step and log10 Hcp (or log10 of the gas -> ions constant)
    at the case temperature, from PHREEQC's own log K, rewritten against the family's master."""
    species_eq, phase_eq = conc_equations(dbname)
    r = dbr["raw"]
    fams = CONC_DB[dbname]["families"]
    out = {"pkw": -r["lk:OH-"], "pka": {}, "log10_hcp": {}}
    for f in case["molality"]:
        spec = fams[f]
        kf = {"H+": 0.0, "H2O": 0.0, "OH-": r["lk:OH-"]}
        named = [s for s in spec["species"] if s]
        # the family's species are written (directly or through each other) from one master
        master = None
        for s in named:
            lhs, rhs = _signed_equation(species_eq[s])
            if len(lhs) == 1 and len(rhs) == 1 and lhs[0][1] == rhs[0][1]:
                master = s
        if master is None:  # the master is written from another valence state (sit.dat HS-)
            master = named[1] if len(named) > 1 else named[0]
        kf[master] = 0.0
        pending = [s for s in named if s != master]
        for _ in range(5):
            for s in list(pending):
                lhs, rhs = _signed_equation(species_eq[s])
                terms = lhs + [(-c, x) for c, x in rhs if x != s]
                if all(x in kf for _, x in terms):
                    kf[s] = r[f"lk:{s}"] + sum(c * kf[x] for c, x in terms)
                    pending.remove(s)
        assert not pending, (dbname, f, pending)
        sp = spec["species"]
        out["pka"][f] = [(kf[sp[j]] - kf[sp[j + 1]]) if sp[j] and sp[j + 1] else None for j in range(len(sp) - 1)]
        if spec.get("gas") and spec["gas"][1] == "database":
            lhs, rhs = _signed_equation(phase_eq[spec["gas"][0]])
            vi = og.volatile_index(f)
            neutral = sp[vi]
            # gas = sum(nu S): log Hcp = log K_phase + kf(neutral) - sum(nu kf(S))
            out["log10_hcp"][f] = r[f"lkp:{f}"] + kf.get(neutral, 0.0) - sum(c * kf[x] for c, x in rhs) \
                if neutral else r[f"lkp:{f}"] - sum(c * kf[x] for c, x in rhs)
        elif spec.get("gas"):
            out["log10_hcp"][f] = r[f"lkp:{f}"]
    return out


def offgas_constants_at(og: Offgas, case: dict) -> dict:
    t_k = case["t"] + og.t0
    out = {"pkw": -og.log_kw(t_k), "pka": {}, "log10_hcp": {}}
    for f in case["molality"]:
        n = len(og.family(f)["species"]) - 1
        out["pka"][f] = [-og.log_ka(f, j, t_k) for j in range(n)]
        if og.gas(f):
            kh = og.log_kh(f, t_k)
            # where the database has no neutral form, the gas -> ions constant is compared
            spec = CONC_DB[case["database"]]["families"][f]
            if spec["species"][og.volatile_index(f)] is None:
                kh += sum(og.log_ka(f, j, t_k) for j in range(n))
            out["log10_hcp"][f] = kh
    return out


def _present(dbr: dict) -> set:
    """Database species present in a run: above CONC_PRESENT_MOLALITY, or above
    CONC_FAMILY_SHARE of their family."""
    out = {k[4:] for k, v in dbr["raw"].items() if k.startswith("mol:") and v >= CONC_PRESENT_MOLALITY}
    for sh in dbr["shares"].values():
        out |= {s for s, v in sh.items() if v >= CONC_FAMILY_SHARE}
    return out


def _fmt(v: float) -> str:
    return f"{v:.4g}"


def conc_differences(og: Offgas, case: dict, dbr: dict, opr: dict, db_params: dict,
                     og_pairs: list[dict], og_consts: dict, db_consts: dict) -> tuple[list[str], list[str]]:
    """What the two models share for the species present, and what the database run has that
    offgas's model does not (and the other way round), as text."""
    dbname = case["database"]
    setup = CONC_DB[dbname]
    out, shared_text = [], []
    present = _present(dbr)
    for f in case["molality"]:
        vi = og.volatile_index(f)
        if vi is not None and f in dbr["gases"] and dbr["gases"][f] >= CONC_GAS_FLOOR_ATM:
            sp = setup["families"][f]["species"][vi]
            if sp:
                present.add(sp)
    t = case["t"]
    # activity model
    if setup["model"] == "sit":
        out.append("activity model: sit.dat's SIT equations (log10 gamma = -z^2 D + sum of epsilon m, "
                   "D = 0.509 sqrt(I)/(1 + 1.5 sqrt(I)) at 25 °C) against offgas's Pitzer equations; "
                   "the two models' coefficients are fitted separately and differ at these ionic strengths")
        eps = read_sit_epsilons(dbname)
        cations = sorted(s for s in present if split_charge(s)[1] > 0)
        anions = sorted(s for s in present if split_charge(s)[1] < 0)
        have = [f"{c}/{a} {eps[frozenset((c, a))]:g}" for c in cations for a in anions if frozenset((c, a)) in eps]
        lack = [f"{c}/{a}" for c in cations for a in anions if frozenset((c, a)) not in eps]
        out.append("sit.dat epsilon (kg/mol) for the ions present: " + (", ".join(have) or "none")
                   + ("; none for " + ", ".join(lack) + " (Debye-Hückel term only)" if lack else ""))
        neutral = sorted(s for s in present if split_charge(s)[1] == 0 and s != "H2O")
        if neutral:
            out.append(f"sit.dat gives the neutral species {', '.join(neutral)} gamma = 1 "
                       "(no epsilon for them): no salting-out")
    else:
        # pair parameters of ions present
        ogp = {frozenset((p["cation"], p["anion"])): p for p in og_pairs}
        cations = sorted(s for s in present if split_charge(s)[1] > 0)
        anions = sorted(s for s in present if split_charge(s)[1] < 0)
        og_name = {}  # database name -> the offgas-parameters run's name
        for f in case["molality"]:
            forms = [s["formula"] for s in og.family(f)["species"]]
            for i, s in enumerate(setup["families"][f]["species"]):
                if s:
                    og_name[s] = OG_NATIVE[f]["names"][forms[i]]
        for i, (_, n) in setup["ions"].items():
            og_name[n] = OG_NATIVE_IONS[i]
        og_name.update({"H+": "H+", "OH-": "OH-"})
        shared, differ, db_only, og_only = [], [], [], []
        for c in cations:
            for a in anions:
                key = frozenset((c, a))
                dbv = {k: db_params.get((k, key)) for k in ("B0", "B1", "B2", "C0")}
                okey = frozenset((og_name.get(c, c), og_name.get(a, a)))
                p = ogp.get(okey)
                in_db = any(v is not None for v in dbv.values())
                if not in_db and p is None:
                    continue
                label = f"{c}/{a}"
                if in_db and p is None:
                    db_only.append(label + " (" + ", ".join(f"{k} {_fmt(v)}" for k, v in dbv.items() if v is not None) + ")")
                    continue
                if p is not None and not in_db:
                    og_only.append(label)
                    continue
                ours = {"B0": p["beta0"], "B1": p["beta1"], "B2": p["beta2"], "C0": p["c_phi"]}
                off = [f"{k} {_fmt(ours[k])} against {_fmt(dbv[k] or 0.0)}" for k in ours
                       if abs(ours[k] - (dbv[k] or 0.0)) > max(CONC_PARAM_REL * abs(dbv[k] or 0.0), CONC_PARAM_ABS)]
                (differ if off else shared).append(label + (" (" + "; ".join(off) + ")" if off else ""))
        if shared:
            shared_text.append("pair parameters the same in both (within 2 % or 0.002): " + ", ".join(shared))
        if differ:
            out.append("pairs whose parameters differ (offgas against pitzer.dat, which refits several "
                       "classic single-salt values over temperature): " + ", ".join(differ))
        if db_only:
            out.append("pairs pitzer.dat has and offgas lacks: " + ", ".join(db_only))
        if og_only:
            out.append("pairs offgas has and pitzer.dat lacks: " + ", ".join(og_only))
        mixing, neutral_terms = [], []
        for (kind, key), v in sorted(db_params.items(), key=lambda x: (x[0][0], sorted(x[0][1]))):
            if kind not in ("THETA", "PSI", "LAMDA", "ZETA"):
                continue
            sp = set(key)
            if sp <= present and v != 0.0:
                who = ",".join(key) if isinstance(key, tuple) else ",".join(sorted(key))
                text = f"{kind.lower().replace('lamda', 'lambda')}({who}) {_fmt(v)}"
                (neutral_terms if kind in ("LAMDA", "ZETA") else mixing).append(text)
        if mixing:
            out.append("mixing terms pitzer.dat has and offgas does not carry: " + ", ".join(mixing))
        if neutral_terms:
            out.append("pitzer.dat's terms for neutral species (its salting-out of the dissolved gas and "
                       "CO2's self-interaction): " + ", ".join(neutral_terms))
        zs_c = sorted({abs(split_charge(s)[1]) for s in cations})
        zs_a = sorted({abs(split_charge(s)[1]) for s in anions})
        uns = []
        if len(zs_c) > 1:
            uns.append("cations of charge " + "/".join(f"{z:g}" for z in zs_c))
        if len(zs_a) > 1:
            uns.append("anions of charge " + "/".join(f"{z:g}" for z in zs_a))
        if uns:
            out.append("unsymmetrical mixing (" + ", ".join(uns) + "): PHREEQC adds the electrostatic "
                       "E-theta terms, offgas does not")
        if t != 25.0:
            out.append(f"at {t:g} °C pitzer.dat's parameters follow their temperature expressions; "
                       "offgas's are the 25 °C values")
    # neutral self-interaction offgas has
    for name, coef in offgas_neutral_lambdas(og):
        if any(OG_NATIVE[f]["names"].get(og.family(f)["volatile"]["species"]) == name
               for f in case["molality"] if og.gas(f)):
            out.append(f"offgas's {name} self-interaction (lambda {coef[0]:.4g} kg/mol at 25 °C), "
                       f"which {dbname} does not have")
    # the dissolved gas's activity coefficient in the two runs (salting-out)
    for f in case["molality"]:
        g_db, g_og = dbr["neutral_gamma"].get(f), opr["neutral_gamma"].get(f)
        if g_db is None or g_og is None or f not in dbr["gases"] or dbr["gases"][f] < CONC_GAS_FLOOR_ATM:
            continue
        if abs(math.log(g_og / g_db)) > math.log(1.02):
            out.append(f"activity coefficient of dissolved {og.gas(f)}: {g_db:.3f} in the database run, "
                       f"{g_og:.3f} with offgas's salting-out parameters (data/salting-out.yaml, "
                       "Weisenberger-Schumpe form, converted to Pitzer lambda terms for PHREEQC)"
                       + (" and NH3 self-interaction" if og.gas(f) == "NH3" else ""))
    # species the database forms that offgas does not model
    for f, sh in dbr["shares"].items():
        for s in setup["families"][f]["others"]:
            if sh.get(s, 0.0) >= CONC_FAMILY_SHARE:
                out.append(f"{s} holds {sh[s]:.1%} of {f} in the database run; offgas has no such species")
    # constants
    if abs(og_consts["pkw"] - db_consts["pkw"]) > CONC_TOL_LOGK:
        out.append(f"pKw {og_consts['pkw']:.3f} (offgas) against {db_consts['pkw']:.3f}")
    for f in case["molality"]:
        forms = [s["formula"] for s in og.family(f)["species"]]
        for j, (a, b) in enumerate(zip(og_consts["pka"][f], db_consts["pka"][f])):
            if b is None:
                continue
            both = min(opr["shares"][f][OG_NATIVE[f]["names"][forms[j]]],
                       opr["shares"][f][OG_NATIVE[f]["names"][forms[j + 1]]])
            if abs(a - b) > CONC_TOL_LOGK and both >= 1e-3:
                out.append(f"{f} pKa{j + 1} ({forms[j]}/{forms[j + 1]}) {a:.3f} (offgas) against {b:.3f}")
        if f in db_consts["log10_hcp"] and f in og_consts["log10_hcp"]:
            a, b = og_consts["log10_hcp"][f], db_consts["log10_hcp"][f]
            if abs(a - b) > CONC_TOL_LOGK:
                out.append(f"{og.gas(f)} log10 Hcp {a:.3f} (offgas) against {b:.3f}")
    return shared_text, out


def read_sit_epsilons(dbname: str) -> dict:
    out, inside = {}, False
    for raw in (DBDIR / dbname).read_text(encoding="latin-1").splitlines():
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        first = line.split()[0]
        if not raw[0].isspace() and first.upper() in KEYWORDS:
            inside = first.upper() == "SIT"
            continue
        if not inside or first.startswith("-"):
            continue
        parts = line.split()
        try:
            out[frozenset(parts[:2])] = float(parts[2])
        except (IndexError, ValueError):
            continue
    return out


def _round_up(x: float, step: float) -> float:
    """x rounded up to a multiple of step (floating-point noise aside)."""
    return math.ceil(x / step - 1e-9) * step


CONC_GAP_NEGLIGIBLE = 1e-3  # gaps below this (pH, fraction; relative for pressure) widen nothing


def conc_fractions(og: Offgas, case: dict, dbr: dict, opr: dict) -> dict:
    """Each family's species fractions (of the liquid total) in offgas's order, in both runs; a
    species the database lacks counts 0, species only the database has are left out."""
    out = {}
    for f in case["molality"]:
        forms = [x["formula"] for x in og.family(f)["species"]]
        db_names = CONC_DB[case["database"]]["families"][f]["species"]
        og_names = [OG_NATIVE[f]["names"][x] for x in forms]
        out[f] = {"species": forms,
                  "database": [dbr["shares"][f][n] if n else 0.0 for n in db_names],
                  "offgas_parameters": [opr["shares"][f][n] for n in og_names]}
    return out


def conc_tolerance(dbr: dict, opr: dict, gas_name: dict, shared_only: bool, fractions: dict) -> dict:
    """The tolerance offgas is held to against the database run."""
    base_ph, base_gas, base_frac = CONC_BASE_TOL["ph"], CONC_BASE_TOL["gas_relative"], CONC_BASE_TOL["fraction"]
    gap_frac = {f: max(abs(a - b) for a, b in zip(v["database"], v["offgas_parameters"]))
                for f, v in fractions.items()}
    gap_ph = abs(dbr["ph"] - opr["ph"])
    gap_gas = {}
    for f, p in dbr["gases"].items():
        q = opr["gases"].get(f)
        if p >= CONC_GAS_FLOOR_ATM and q:
            gap_gas[gas_name[f]] = max(p / q, q / p)
    if shared_only:
        return {"ph": base_ph, "gas_relative": {f: base_gas for f in gap_gas},
                "fraction": {f: base_frac for f in gap_frac}, "widened": False,
                "reason": "the two models share their parameters for this mixture: base tolerance"}
    def widen(base, gap):
        return base if gap < CONC_GAP_NEGLIGIBLE else round(_round_up(base + gap, 0.01), 2)

    ph = widen(base_ph, gap_ph)
    gas = {f: widen(base_gas, (1 + base_gas) * r - 1 - base_gas) for f, r in gap_gas.items()}
    frac = {f: widen(base_frac, g) for f, g in gap_frac.items()}
    gas_txt = ", ".join(f"{f} x{r:.3f}" for f, r in gap_gas.items())
    return {"ph": ph, "gas_relative": gas, "fraction": frac, "widened": True,
            "reason": (f"the differences listed move PHREEQC's own result: the database run and PHREEQC "
                       f"with offgas's parameters differ by {gap_ph:.3f} in pH"
                       + (f", by a factor {gas_txt} in partial pressure" if gas_txt else "")
                       + ", by " + ", ".join(f"{g:.3f} ({f})" for f, g in gap_frac.items())
                       + " in species fractions; the base tolerance is widened by that gap: pH 0.1 + "
                       "gap, a fraction 0.05 + gap, a pressure ratio 1.15 x PHREEQC's own ratio "
                       "(each rounded up to 0.01; a gap below 0.001 widens nothing); against the "
                       "offgas-parameters run offgas is held to 0.03 in pH, 5 % and 0.02 "
                       "(tests/reference_concentrated.rs)")}


def compute_concentrated(og: Offgas) -> list[dict]:
    ids = [c["id"] for c in CONC_CASES]
    assert len(ids) == len(set(ids)) and not set(ids) & {c["id"] for c in CASES}, "duplicate case ids"
    inst = {}
    for dbname in sorted({c["database"] for c in CONC_CASES}):
        extra = conc_database_definitions(dbname, og)
        if CONC_DB[dbname]["model"] == "pitzer":
            # unscaled single-ion activities (offgas's convention) ...
            inst[dbname] = new_phreeqc(dbname, extra + "PITZER\n    -MacInnes false\n")
            # ... and the database's own MacInnes scaling, for the pH it reports
            inst[dbname + ":macinnes"] = new_phreeqc(dbname, extra)
        else:
            inst[dbname] = new_phreeqc(dbname, extra)
    og_db_text = offgas_pitzer_database(og)
    p_vol = phreeqc.Phreeqc()
    if p_vol.LoadBuiltInDatabase(CONC_VOLUME_DB):
        raise RuntimeError(p_vol.GetErrorString())
    og_pairs = offgas_pitzer_pairs(og)
    db_params = {db: read_pitzer_block(db) for db in CONC_DB if CONC_DB[db]["model"] == "pitzer"}
    out = []
    for case in CONC_CASES:
        dbname = case["database"]
        setup = CONC_DB[dbname]
        dbr = run_conc_database(og, inst[dbname], dbname, case)
        ph_mac = None
        if setup["model"] == "pitzer":
            mac = run_conc_database(og, inst[dbname + ":macinnes"], dbname, case)
            # the scaling changes single-ion activities only: every reaction balances in charge,
            # so the gases and the speciation are the same
            for f, v in dbr["gases"].items():
                assert abs(mac["gases"][f] / v - 1) < 1e-6, (case["id"], f)
            for f, sh in dbr["shares"].items():
                for sp, v in sh.items():
                    assert abs(mac["shares"][f][sp] - v) < 1e-6, (case["id"], sp)
            ph_mac = mac["ph"]
        if setup["model"] == "pitzer":
            volume, vsource = dbr["initial_volume_l"], f"{dbname} (SOLN_VOL of the solution as made up)"
        else:
            volume = conc_liquid_volume(p_vol, case)
            vsource = (f"{CONC_VOLUME_DB} (SOLN_VOL of the solution as made up; {dbname} has no molar "
                       "volumes of aqueous species)")
        water_kg = 1.0
        opr = run_conc_offgas_parameters(og, og_db_text, case, volume, water_kg)
        db_consts = conc_database_constants(og, dbname, case, dbr)
        og_consts = offgas_constants_at(og, case)
        shared, diffs = conc_differences(og, case, dbr, opr, db_params.get(dbname, {}), og_pairs,
                                         og_consts, db_consts)
        shared_only = not diffs
        gas_name = {f: og.gas(f) for f in case["molality"] if og.gas(f)}
        fractions = conc_fractions(og, case, dbr, opr)
        tol = conc_tolerance(dbr, opr, gas_name, shared_only, fractions)

        def result(res, extra=None):
            d = {"ph": res["ph"], "ionic_strength": res["ionic_strength"],
                 "water_activity": res["water_activity"], "osmotic_coefficient": res["osmotic_coefficient"],
                 "gases_atm": {gas_name[f]: v for f, v in res["gases"].items()},
                 "gas_moles": {gas_name[f]: v for f, v in res["gas_moles"].items()},
                 "dissolved_gas_activity_coefficient": {gas_name[f]: v for f, v in res["neutral_gamma"].items()},
                 "species_shares": res["shares"]}
            d.update(extra or {})
            return d

        out.append({
            "id": case["id"],
            "description": case["description"],
            "database": dbname,
            "activity_model": setup["model"],
            "temperature_c": case["t"],
            "water_kg": water_kg,
            "molality": {"families": dict(case["molality"]), "ions": dict(case["ions"])},
            "moles": {"families": {f: m * water_kg for f, m in case["molality"].items()},
                      "ions": {i: m * water_kg for i, m in case["ions"].items()}},
            "liquid_l": volume,
            "liquid_volume_source": vsource,
            "headspace_l": case["vg"],
            "headspace_fraction": case["vg"] / (case["vg"] + volume),
            "families": {f: m * water_kg / volume for f, m in case["molality"].items()},
            "ions": {i: m * water_kg / volume for i, m in case["ions"].items()},
            **({"initial_pe": case["pe"]} if "pe" in case else {}),
            "database_result": result(dbr, {"ph_macinnes": ph_mac} if ph_mac is not None else None),
            "offgas_parameters_result": result(opr),
            "constants_at_case_temperature": {
                "pkw": {"offgas": og_consts["pkw"], "database": db_consts["pkw"]},
                "pka": {f: {"offgas": og_consts["pka"][f], "database": db_consts["pka"][f]} for f in case["molality"]},
                "log10_hcp_mol_per_kg_atm": {gas_name[f]: {"offgas": og_consts["log10_hcp"][f],
                                                           "database": db_consts["log10_hcp"].get(f)}
                                             for f in case["molality"] if og.gas(f)},
            },
            "species_fractions": fractions,
            "database_gas_phases": {gas_name[f]: (f"{dbname} phase {setup['families'][f]['gas'][0]}"
                                                  if setup["families"][f]["gas"][1] == "database" else
                                                  f"added to {dbname} from offgas's data/species.yaml constants")
                                    for f in case["molality"] if setup["families"][f].get("gas")},
            "parameters_shared": shared_only,
            "shared": shared,
            "differences": diffs,
            "tolerance": tol,
        })
    return out


def _hand_pitzer_gamma_1_1(b0: float, b1: float, c_phi: float, m: float, a_phi: float) -> float:
    """Mean activity coefficient of a 1:1 salt alone at molality m, from Pitzer's equations
    written out (b = 1.2, alpha1 = 2)."""
    s, b = math.sqrt(m), 1.2
    f = -a_phi * (s / (1 + b * s) + 2 / b * math.log(1 + b * s))
    x = 2 * s
    bg = 2 * b0 + 2 * b1 / (x * x) * (1 - (1 + x - x * x / 2) * math.exp(-x))
    return math.exp(f + m * bg + m * m * 1.5 * c_phi)


def conc_sanity_checks(og: Offgas, cases: dict) -> None:
    """Hand checks of the concentrated set-up."""
    # HCl 1 mol/kg: gamma+-(HCl) from the HCl pressure of the offgas-parameters run,
    # p = a(H+) a(Cl-) / K, against Pitzer's equations written out with offgas's parameters
    # and a textbook value (0.809 at 25 °C; memory: Robinson & Stokes, Electrolyte Solutions).
    c = cases["pz_hcl_1m"]
    r = c["offgas_parameters_result"]
    t_k = 298.15
    log_k = og.log_kh("chloride", t_k) + og.log_ka("chloride", 0, t_k)
    m_liq = c["moles"]["families"]["chloride"] - r["gas_moles"]["HCl"]
    gamma = math.sqrt(r["gases_atm"]["HCl"] * 10 ** log_k) / m_liq
    pair = next(p for p in offgas_pitzer_pairs(og) if p["cation"] == "H+" and p["anion"] == "Cl-")
    a_phi = yaml.safe_load((ROOT / "data" / "pitzer.yaml").read_text(encoding="utf-8"))["debye_huckel"]["a_phi"]
    hand = _hand_pitzer_gamma_1_1(pair["beta0"], pair["beta1"], pair["c_phi"], m_liq, float(a_phi))
    assert abs(gamma / hand - 1) < 2e-3, (gamma, hand)
    assert abs(gamma - 0.809) < 0.01, gamma
    # (offgas's H+/Cl- pair is refitted to 15 mol/kg, so it no longer equals pitzer.dat's:
    # the case's comparison with the database is widened like the others.)
    # the offgas-parameters run depends on the mixture only, not on the case's database
    a, b = cases["pz_hcl_3m_nacl_1m"], cases["sit_hcl_3m_nacl_1m"]
    assert a["moles"] == b["moles"]
    for k in ("ph", "ionic_strength", "water_activity"):
        # (their liquid volumes, and so offgas's salting-out of the trace of molecular HCl,
        # differ slightly)
        assert abs(a["offgas_parameters_result"][k] - b["offgas_parameters_result"][k]) < 1e-6, k
    # the MacInnes scaling moves pH only; concentrated caustic is above pH 14
    for c in cases.values():
        if c.get("activity_model") == "pitzer":
            assert "ph_macinnes" in c["database_result"], c["id"]
    assert cases["pz_koh_4m_carbonate"]["database_result"]["ph"] > 14.5
    assert cases["pz_hcl_5m_kcl_1m"]["database_result"]["ph"] < -1.0


def conc_notes(conc: list[dict]) -> list[str]:
    """Notes on the concentrated cases, with the numbers that depend on the runs filled in."""
    mac = [abs(c["database_result"]["ph"] - c["database_result"]["ph_macinnes"]) for c in conc
           if "ph_macinnes" in c["database_result"]]
    n_pz = sum(1 for c in conc if c["activity_model"] == "pitzer")
    widest = max(conc, key=lambda c: c["tolerance"]["ph"])
    return [
        f"Concentrated cases ({len(conc)}; {n_pz} with pitzer.dat, {len(conc) - n_pz} with sit.dat; they carry "
        "`activity_model`): entered in mol per kg of water (`-units mol/kgw`, 1 kg of water, `molality`), with the "
        "databases' native species, since their ion-interaction parameters are attached to species names; the "
        "same fixed-volume gas phase as the dilute cases. Each is solved twice: `database_result` (pitzer.dat or "
        "sit.dat as shipped, with the additions below) and `offgas_parameters_result` (PHREEQC's Pitzer equations "
        "with offgas's model, below). tests/reference_concentrated.rs holds offgas to the second within 0.03 in pH, "
        "5 % in each partial pressure and 0.02 in each species fraction (the same model, computed by another program), "
        "and to the first within `tolerance`: 0.1, 15 % and 0.05 where the two share their parameters "
        "(`parameters_shared`), else widened by the gap between PHREEQC's two runs (`tolerance.reason`), whose causes "
        "`differences` lists. Gases below 1e-9 atm are not compared.",
        "pH convention: PHREEQC's Pitzer model scales single-ion activity coefficients by the MacInnes convention "
        "(gamma(Cl-) = gamma+-(KCl) at the same ionic strength) unless told otherwise; offgas's Pitzer equations are "
        "unscaled. The pitzer.dat runs set `PITZER -MacInnes false`, so pH is on offgas's convention; pitzer.dat's "
        f"scaled pH is kept as `database_result.ph_macinnes` (it differs by {min(mac):.2f} to {max(mac):.2f} in "
        "these cases). The scaling multiplies each ion's activity by a power of one factor set by its charge, so "
        "every reaction, which balances in charge, keeps its activity product: gases and speciation are the same "
        "(the script checks it to 1e-6).",
        "Redox: pitzer.dat has no redox couple among these elements (carbon is C(4) only, sulfur S(6) only, and "
        "sulfide is its own uncoupled element Sg, species H2Sg and HSg-). sit.dat couples N(-3) with N(5) and S(-2) "
        "with S(6), and counts the polysulfide S2-2 in the S(-2) balance. Its cases are entered as valence states "
        "(N(-3), S(-2)); no case mixes a reduced and an oxidised state of one element; the sulfide case starts at "
        "pe 1.5 (`initial_pe`), inside the stability field of H2S at its pH: at the default pe 4 the initial solution "
        "puts part of the sulfide into other species of the S(-2) balance, and the batch step then turns about a "
        "fifth of the sulfur into sulfate; much lower, water would give off hydrogen. After every run the script "
        "checks that the element total equals the entered valence state's (1e-9), that liquid + gas equals the input "
        "(1e-6) and, for sit.dat, that H(0) and O(0) stay below 1e-6 mol/kg, i.e. that no redox took place.",
        "Gases added: pitzer.dat has no HCl gas; HCl(g) = H+ + Cl- is added with offgas's Ka*Hcp and enthalpy "
        "(data/species.yaml) and critical constants (memory) so that it can join pitzer.dat's Peng-Robinson gas "
        "phase; HCl pressures over these acids therefore test the activity model alone. sit.dat has no NH3 gas; "
        "NH3(g) = NH3 is added from offgas's Henry's law constant. pitzer.dat's H2S gas is its own H2Sg(g); sit.dat's "
        "CO2, H2S and HCl gases are its own. Partial pressures are 10^SI / PR_PHI as in the dilute cases.",
        "offgas_parameters_result: a PHREEQC database written by the script (no ion pairs) with offgas's species and "
        "constants (as in the offgas-constants runs) and a PITZER block with offgas's cation-anion parameters "
        "(data/pitzer.yaml, the pairs among the ions these cases use), offgas's NH3 self-interaction "
        "(data/species.yaml) as LAMDA NH3 NH3, offgas's salting-out of each dissolved gas (data/salting-out.yaml: "
        "log10 gamma = sum over the ions of (h_i + h_G) c_i with c_i in mol/L, which is exactly Pitzer lambda "
        "terms lambda(gas, ion) = ln 10 (h_i + h_G) (water_kg / liquid_l) / 2 for the case's liquid; an ion "
        "without h counts 0, as in offgas), `-use_etheta false` (no unsymmetrical-mixing terms, which offgas "
        "does not carry) and `-MacInnes false`; neutral species have gamma = 1 except through that lambda; gases are "
        "ideal. PHREEQC computes A-phi from its own water properties and the activity of water from the osmotic "
        "coefficient, which enters every reaction written with H2O: Kw and the carbonate step CO2 + H2O = HCO3- + "
        "H+ among them (offgas's pKa1 of carbonate is that reaction's constant, so in brine the step carries the "
        "water activity; at a(H2O) = 0.8 that is 0.1 in log K). No case holds, in more than a trace, an ion that "
        "offgas's pair parameters do not name (offgas gives such ions an extended Debye-Hückel form, which "
        "PHREEQC's Pitzer equations cannot express). It reproduces "
        "Pitzer's equations written out: gamma+-(HCl, 1 mol/kg) from its HCl pressure agrees with the formula within "
        "2e-3 and with the textbook 0.809 (memory) within 0.01 (checked by the script). Rerun the script after "
        "changing data/pitzer.yaml, data/salting-out.yaml or data/species.yaml."
        + ("" if offgas_salting() is not None else " (data/salting-out.yaml was absent at this run: no "
           "salting-out, dissolved gases have gamma = 1 but for NH3's self-interaction.)"),
        "Liquid volume: `liquid_l` is PHREEQC's SOLN_VOL of the solution as made up, from pitzer.dat's molar volumes "
        "for the Pitzer cases and from phreeqc.dat's for the SIT cases (sit.dat has no molar volumes of aqueous "
        "species, so its own SOLN_VOL is that of the water alone). `water_kg` is 1. In PHREEQC the split between "
        "liquid and gas depends on molality and gas volume only; offgas gets moles, the liquid volume and the water "
        "mass and converts itself.",
        "Differences (`differences`, per case): species present are those above 1e-3 mol/kg or 1 % of their family; "
        "for them the script lists the pitzer.dat pair parameters (25 °C values, the first coefficient of PHREEQC's "
        "temperature expression) that differ from offgas's by more than 2 % (or 0.002), pairs one side lacks, mixing "
        "terms (theta, psi), lambda and zeta terms of neutral species, unsymmetrical mixing, species offgas does not "
        "model holding more than 1 % of a family, and constants (pKw, pKa, log10 Hcp) differing by more than 0.02; "
        "for sit.dat the model itself and its epsilon values. Pairs that agree are listed in `shared`. "
        f"The widest pH tolerance is {widest['tolerance']['ph']:.2f} ({widest['id']}).",
    ]


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
        if "activity_model" in c:
            continue
        for gas, v in c["constants_at_case_temperature"]["log10_hcp_mol_per_kg_atm"].items():
            assert v["offgas"] is not None
    for fid in COPIES:
        if og.log_kh(fid, 283.15) is not None:
            assert og.log_kh(fid, 283.15) > og.log_kh(fid, 313.15), fid
    conc_sanity_checks(og, cases)


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
    conc_cases = compute_concentrated(og)
    dbs_used = sorted({c["database"] for c in CASES} | {OFFGAS_HOST_DB}
                      | {c["database"] for c in CONC_CASES} | {CONC_VOLUME_DB})
    doc = {
        "generator": GENERATOR,
        "phreeqc_package_version": _pkg_version("phreeqc"),
        "iphreeqc_version": phreeqc.Phreeqc.GetVersionString(),
        "databases": dbs_used,
        "offgas_constants_host_database": OFFGAS_HOST_DB,
        "units": {"concentrations": "mol per litre of liquid, liquid + gas", "volumes": "L",
                  "temperature": "°C", "gases_atm": "partial pressure, atm",
                  "ionic_strength": "mol/kg water (= mol/L here, see notes)",
                  "concentrated_cases": "cases with an activity_model (pitzer, sit): `molality` as "
                                        "entered (mol per kg of water), `moles` = molality x water_kg "
                                        "(liquid + gas), `families`/`ions` = moles per litre of liquid, "
                                        "ionic_strength in mol/kg water"},
        "notes": build_notes(og, setups, out_cases, a_table) + conc_notes(conc_cases),
        "debye_huckel_a": a_table,
        "cases": out_cases + conc_cases,
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
    cases = [c for c in doc["cases"] if "activity_model" not in c]
    conc = [c for c in doc["cases"] if "activity_model" in c]
    n_db = sum(1 for c in cases if c["reference"] == "database")
    gases = sorted({g for c in cases for g in c[f"{c['reference']}_result"]["gases_atm"]})
    n_pz = sum(1 for c in conc if c["activity_model"] == "pitzer")
    n_shared = sum(1 for c in conc if c["parameters_shared"])
    return (f"{len(cases)} dilute cases ({n_db} against the database, {len(cases) - n_db} against "
            f"offgas's constants), databases {', '.join(doc['databases'])}, gases {', '.join(gases)}; "
            f"{len(conc)} concentrated cases ({n_pz} Pitzer, {len(conc) - n_pz} SIT; {n_shared} sharing "
            f"all their parameters with offgas)")


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
