#!/usr/bin/env python3
"""Speed and agreement of offgas against PHREEQC on random mixtures.

Generates N random mixtures (seeded; families that llnl.dat carries and this reference can
set up as non-reacting copies, totals 1e-4 to 0.2 mol/L, ionic strength at most 0.5 mol/L,
10-40 °C, sealed headspace 5-60 % of the vessel), in the case schema of golden.json, and
solves them

* with PHREEQC in one process, in the offgas-constants set-up of make_golden.py (offgas's
  constants and species, Davies) and, for timing only, in the llnl.dat database set-up.
  All mixtures go into one RunString (one SOLUTION/GAS_PHASE simulation each), which is how
  a user would batch many equilibria; only RunString is timed (database loading and the
  definitions are excluded, and so is reading the selected output back into Python);
* with offgas: `cargo run --release --example solve_batch -- FILE.json --repeat R` in the
  repository root (its median_ns_per_solve).

Prints the time per solve of each, their ratio, the time per equilibrium calculation on each
side and how each is counted (below), and the agreement of offgas with the
offgas-constants PHREEQC run (median and 95th percentile of |ΔpH| and of |Δlog10 p| for the
main gas, the one with the highest PHREEQC partial pressure); writes speed_result.json.

How an equilibrium is counted. PHREEQC: every mixture is two calculations, each a
Newton-Raphson solution of its own: the initial solution (SOLUTION: speciation with the
charge balance on H+, no gas) and the batch reaction (that solution equilibrated with its
fixed-volume GAS_PHASE; a mixture without a volatile family has no gas phase and no batch
reaction); the number of each is read from PHREEQC's selected output (`state` i_soln and
react), not assumed. offgas: one solve per mixture, liquid and headspace in one system, from
a cold start (solve_batch calls `solve`, not the warm-started `solve_from` a pour uses).
"Per solve" is per mixture on both sides; "per calculation" divides PHREEQC's time by its
calculations.

Usage: python tests/reference/speed_benchmark.py [--n 1000] [--seed 20240611] [--repeat 20]
"""

from __future__ import annotations

import argparse
import json
import math
import random
import statistics
import subprocess
import sys
import tempfile
import time
from importlib.metadata import version as pkg_version
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.dont_write_bytecode = True  # no __pycache__ in tests/reference
sys.path.insert(0, str(HERE))
import make_golden as mg  # noqa: E402
import phreeqc  # noqa: E402

ROOT = mg.ROOT
RESULT = HERE / "speed_result.json"
DB = "llnl.dat"
# Families llnl.dat carries and make_golden.py sets up; at least one "main" volatile family
# (a gas llnl.dat has, or HCN) is in every mixture.
POOL = ["carbonate", "sulfide", "sulfite", "sulfate", "ammonia", "nitrate", "fluoride",
        "chloride", "acetate", "cyanide", "hypochlorite"]
MAIN = ["carbonate", "sulfide", "sulfite", "ammonia", "fluoride", "cyanide"]
C_MIN, C_MAX = 1e-4, 0.2
I_MAX = 0.5


def base_capacity(og: mg.Offgas, fid: str) -> int:
    """Protons strong base can take from the family's neutral form (steps with pKa < 13)."""
    fam = og.family(fid)
    charges = [s["charge"] for s in fam["species"]]
    pkas = [float(s["pka"]) for s in fam["steps"]]
    if 0 in charges:
        start = charges.index(0)  # steps start.. take protons from the neutral form onwards
        return sum(1 for j in range(start, len(pkas)) if pkas[j] < 13)
    # no neutral species (sulfate: HSO4-/SO4-2): the implicit neutral acid gives one more proton
    return 1 + sum(1 for pk in pkas if pk < 13)


def ionic_bound(og: mg.Offgas, fams: dict, ions: dict) -> float:
    """An upper bound of the ionic strength: every family species at its largest charge, every
    strong ion, and every proton the neutral forms can give up as H+."""
    s = sum(c for c in ions.values())
    for f, c in fams.items():
        zmax = max(abs(sp["charge"]) for sp in og.family(f)["species"])
        s += c * zmax * zmax + c * base_capacity(og, f)
    return 0.5 * s


def random_cases(og: mg.Offgas, n: int, seed: int) -> list[dict]:
    rng = random.Random(seed)
    out = []
    lo, hi = math.log10(C_MIN), math.log10(C_MAX)
    while len(out) < n:
        k = rng.randint(1, 4)
        fams = [rng.choice(MAIN)]
        while len(fams) < k:
            f = rng.choice(POOL)
            if f not in fams:
                fams.append(f)
        conc = {f: round(10 ** rng.uniform(lo, hi), 6) for f in fams}
        conc = {f: max(c, C_MIN) for f, c in conc.items()}
        capacity = sum(c * base_capacity(og, f) for f, c in conc.items())
        ions = {}
        if capacity > 0 and rng.random() < 0.8:
            base = round(capacity * rng.uniform(0.0, 1.2), 6)
            if base >= C_MIN:
                ions[rng.choice(["Na+", "K+"])] = base
        if ionic_bound(og, conc, ions) > I_MAX:
            continue
        frac = rng.uniform(0.05, 0.60)
        vl = round(10 ** rng.uniform(math.log10(0.5), math.log10(20.0)), 3)
        vg = round(vl * frac / (1 - frac), 4)
        t = round(rng.uniform(10.0, 40.0), 1)
        out.append({"id": f"rand{len(out):04d}", "t": t, "vl": vl, "vg": vg,
                    "families": conc, "ions": ions})
    return out


def to_schema(c: dict) -> dict:
    return {"id": c["id"], "temperature_c": c["t"], "liquid_l": c["vl"], "headspace_l": c["vg"],
            "families": c["families"], "ions": c["ions"]}


def time_phreeqc(p, text: str, repeats: int) -> list[float]:
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        errors = p.RunString(text)
        times.append(time.perf_counter() - t0)
        if errors:
            raise RuntimeError(p.GetErrorString())
    return times


def calculations(p) -> dict:
    """PHREEQC's calculations in the last run, from the selected output's `state` column:
    i_soln (initial solution) and react (batch reaction with the gas phase)."""
    states = [str(s).strip() for s in p.GetSelectedOutput()["state"]]
    return {"initial_solution": states.count("i_soln"), "batch_reaction": states.count("react")}


HOW_COUNTED = (
    "PHREEQC: per mixture one initial-solution calculation (SOLUTION, speciation with the charge "
    "balance on H+) and one batch-reaction calculation (the solution with its fixed-volume "
    "GAS_PHASE), each its own Newton-Raphson solution; counts read from the selected output's "
    "state column. offgas: one solve per mixture, liquid and headspace in one system, cold start."
)


def drop_failures(og, p, cases: list[dict]) -> tuple[list[dict], list[str]]:
    """Cases PHREEQC cannot solve one by one (reported, left out of the comparison)."""
    good, bad = [], []
    for c in cases:
        _, text = mg.offgas_punch_and_input(og, [c], lean=True)
        if p.RunString(text):
            bad.append(c["id"])
        else:
            good.append(c)
    return good, bad


def llnl_batch_input(setup: mg.DbSetup, og: mg.Offgas, cases: list[dict]) -> str:
    pu = mg.Punch()
    pu.add("ph", '-LA("H+")')
    pu.add("mu", "MU")
    parts = [pu.block()]
    phases = setup.gas_phases()
    for k, c in enumerate(cases):
        elem = [(mg.COPIES[f]["elem"], v, og.molar_mass(f)) for f, v in c["families"].items()]
        elem += [(mg.ION_COPIES[i]["elem"], v, float(og.ions[i]["molar_mass"])) for i, v in c["ions"].items()]
        parts.append(mg.solution_block(k + 1, c, elem))
        gases = [g["name"] for g in phases if all(f in c["families"] for f in g["parents"])]
        if gases:
            parts.append(mg.gas_block(k + 1, c, gases))
        parts.append("END\n")
    return "".join(parts)


def pct(values: list[float], q: float) -> float:
    v = sorted(values)
    if not v:
        return float("nan")
    pos = q * (len(v) - 1)
    i = int(math.floor(pos))
    j = min(i + 1, len(v) - 1)
    return v[i] + (v[j] - v[i]) * (pos - i)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--n", type=int, default=1000)
    ap.add_argument("--seed", type=int, default=20240611)
    ap.add_argument("--repeat", type=int, default=20, help="offgas repeats (solve_batch --repeat)")
    ap.add_argument("--phreeqc-repeat", type=int, default=3, help="PHREEQC batch runs timed (median)")
    ap.add_argument("--cases-out", type=Path, help="also keep the generated mixtures here")
    ap.add_argument("--out", type=Path, default=RESULT)
    args = ap.parse_args(argv)

    og = mg.Offgas()
    cases = random_cases(og, args.n, args.seed)

    # PHREEQC, offgas-constants set-up (database loading and definitions not timed)
    p = mg.new_phreeqc(mg.OFFGAS_HOST_DB, mg.offgas_definitions(og))
    failed = []
    pu, text = mg.offgas_punch_and_input(og, cases, lean=True)
    try:
        times = time_phreeqc(p, text, args.phreeqc_repeat)
    except RuntimeError:
        cases, failed = drop_failures(og, p, cases)
        pu, text = mg.offgas_punch_and_input(og, cases, lean=True)
        times = time_phreeqc(p, text, args.phreeqc_repeat)
    calc = calculations(p)
    rows = pu.rows(p)
    assert len(rows) == len(cases)
    phreeqc_s = statistics.median(times) / len(cases)
    phreeqc_calc_s = statistics.median(times) / sum(calc.values())

    # PHREEQC, llnl.dat database set-up (timing only)
    setup = mg.DbSetup(DB, og)
    p2 = mg.new_phreeqc(DB, setup.definitions)
    try:
        times_db = time_phreeqc(p2, llnl_batch_input(setup, og, cases), args.phreeqc_repeat)
        calc_db = calculations(p2)
        phreeqc_db_s = statistics.median(times_db) / len(cases)
        phreeqc_db_calc_s = statistics.median(times_db) / sum(calc_db.values())
        db_error = None
    except RuntimeError as e:
        phreeqc_db_s, phreeqc_db_calc_s, calc_db, db_error = None, None, None, str(e)[:500]

    # offgas
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "speed_cases.json"
        doc = {"cases": [to_schema(c) for c in cases]}
        path.write_text(json.dumps(doc, indent=1, sort_keys=True))
        if args.cases_out:
            args.cases_out.write_text(json.dumps(doc, indent=1, sort_keys=True))
        cmd = ["cargo", "run", "--release", "--quiet", "--example", "solve_batch", "--",
               str(path), "--repeat", str(args.repeat)]
        run = subprocess.run(cmd, cwd=ROOT, capture_output=True, text=True)
        if run.returncode != 0:
            print(run.stderr, file=sys.stderr)
            print("offgas solve_batch failed", file=sys.stderr)
            return 1
        og_out = json.loads(run.stdout)
    offgas_s = og_out["median_ns_per_solve"] * 1e-9
    results = {r["id"]: r for r in og_out["results"]}

    # agreement with the offgas-constants PHREEQC run
    dph, dlogp, worst, errors = [], [], [], []
    all_gases, by_gas = [], {}
    for c, r in zip(cases, rows):
        o = results[c["id"]]
        if "error" in o:
            errors.append({"id": c["id"], "error": o["error"]})
            continue
        gases = {og.gas(f): 10 ** r[f"si:{f}"] for f in c["families"] if mg.COPIES[f]["gas"]}
        for cid in og.combined_in(c["families"]):
            if og.combined[cid].get("volatile"):
                gases[og.combined[cid]["volatile"]["gas"]] = 10 ** r[f"si:{cid}"]
        main_gas = max(gases, key=gases.get)
        d1 = abs(o["ph"] - r["ph"])
        p_og = o["gases_atm"].get(main_gas, 0.0)
        d2 = abs(math.log10(max(p_og, 1e-300)) - math.log10(gases[main_gas]))
        dph.append(d1)
        dlogp.append(d2)
        by_gas.setdefault(main_gas, []).append(d2)
        for gas, pp in gases.items():
            if pp >= 1e-9:
                all_gases.append(abs(math.log10(max(o["gases_atm"].get(gas, 0.0), 1e-300)) - math.log10(pp)))
        worst.append({"id": c["id"], "abs_dph": d1, "main_gas": main_gas, "abs_dlog10_p": d2,
                      "phreeqc_ph": r["ph"], "offgas_ph": o["ph"], "ionic_strength": r["mu"]})
    worst.sort(key=lambda w: (w["abs_dph"], w["abs_dlog10_p"]), reverse=True)
    ionic = [r["mu"] for r in rows]

    result = {
        "generator": "tests/reference/speed_benchmark.py",
        "seed": args.seed,
        "mixtures": len(cases),
        "phreeqc_failures": failed,
        "offgas_errors": errors,
        "phreeqc_package_version": pkg_version("phreeqc"),
        "iphreeqc_version": phreeqc.Phreeqc.GetVersionString(),
        "ionic_strength_range": [min(ionic), max(ionic)],
        "ph_range": [min(r["ph"] for r in rows), max(r["ph"] for r in rows)],
        "timing": {
            "phreeqc_offgas_constants_s_per_solve": phreeqc_s,
            "phreeqc_llnl_database_s_per_solve": phreeqc_db_s,
            "phreeqc_llnl_database_error": db_error,
            "phreeqc_offgas_constants_s_per_calculation": phreeqc_calc_s,
            "phreeqc_llnl_database_s_per_calculation": phreeqc_db_calc_s,
            "phreeqc_offgas_constants_calculations": calc,
            "phreeqc_llnl_database_calculations": calc_db,
            "offgas_solves_per_mixture": 1,
            "how_counted": HOW_COUNTED,
            "phreeqc_batch_runs_timed": args.phreeqc_repeat,
            "offgas_s_per_solve": offgas_s,
            "offgas_repeat": og_out["repeat"],
            "ratio_phreeqc_offgas_constants_over_offgas": phreeqc_s / offgas_s,
            "ratio_phreeqc_llnl_over_offgas": (phreeqc_db_s / offgas_s) if phreeqc_db_s else None,
            "ratio_phreeqc_offgas_constants_per_calculation_over_offgas_per_solve": phreeqc_calc_s / offgas_s,
            "how": "PHREEQC: all mixtures in one RunString (one SOLUTION + GAS_PHASE simulation each, "
                   "lean USER_PUNCH), median of the timed batch runs over the number of mixtures; "
                   "database loading and definitions excluded. offgas: solve_batch median over its repeats.",
        },
        "agreement_with_phreeqc_offgas_constants": {
            "abs_dph_median": statistics.median(dph),
            "abs_dph_p95": pct(dph, 0.95),
            "abs_dph_max": max(dph),
            "abs_dlog10_p_main_gas_median": statistics.median(dlogp),
            "abs_dlog10_p_main_gas_p95": pct(dlogp, 0.95),
            "abs_dlog10_p_main_gas_max": max(dlogp),
            "abs_dlog10_p_every_gas_above_1e-9_atm_p95": pct(all_gases, 0.95),
            "abs_dlog10_p_every_gas_above_1e-9_atm_max": max(all_gases),
            "gases_compared_above_1e-9_atm": len(all_gases),
            "main_gas_counts_and_max_abs_dlog10_p": {g: {"mixtures": len(v), "max": max(v)} for g, v in sorted(by_gas.items())},
            "worst_5": worst[:5],
        },
    }
    args.out.write_text(json.dumps(result, indent=1, sort_keys=True) + "\n")
    t, a = result["timing"], result["agreement_with_phreeqc_offgas_constants"]
    print(f"mixtures: {len(cases)} (PHREEQC failures {len(failed)}, offgas errors {len(errors)}), "
          f"I {min(ionic):.2g}-{max(ionic):.2g} mol/L")
    print(f"PHREEQC (offgas constants): {t['phreeqc_offgas_constants_s_per_solve'] * 1e6:.1f} µs per solve")
    if phreeqc_db_s:
        print(f"PHREEQC (llnl.dat):         {phreeqc_db_s * 1e6:.1f} µs per solve")
    print(f"offgas:                     {offgas_s * 1e6:.2f} µs per solve")
    print(f"per equilibrium calculation: PHREEQC {phreeqc_calc_s * 1e6:.1f} µs (offgas constants; "
          f"{calc['initial_solution']} initial solutions + {calc['batch_reaction']} batch reactions)"
          + (f", {phreeqc_db_calc_s * 1e6:.1f} µs (llnl.dat; {calc_db['initial_solution']} + "
             f"{calc_db['batch_reaction']})" if phreeqc_db_s else "")
          + f"; offgas {offgas_s * 1e6:.2f} µs (one solve per mixture)")
    print("how counted: " + HOW_COUNTED)
    print(f"ratio PHREEQC/offgas: {t['ratio_phreeqc_offgas_constants_over_offgas']:.0f} (offgas constants)"
          + (f", {t['ratio_phreeqc_llnl_over_offgas']:.0f} (llnl.dat)" if phreeqc_db_s else "")
          + f" per mixture; {phreeqc_calc_s / offgas_s:.0f} per equilibrium calculation (offgas constants)")
    print(f"|ΔpH| median {a['abs_dph_median']:.2e}, p95 {a['abs_dph_p95']:.2e}, max {a['abs_dph_max']:.2e}; "
          f"|Δlog10 p| main gas median {a['abs_dlog10_p_main_gas_median']:.2e}, "
          f"p95 {a['abs_dlog10_p_main_gas_p95']:.2e}, max {a['abs_dlog10_p_main_gas_max']:.2e}")
    print(f"summary: {len(cases)} mixtures, PHREEQC {phreeqc_s * 1e6:.1f} µs vs offgas "
          f"{offgas_s * 1e6:.2f} µs per solve (x{phreeqc_s / offgas_s:.0f}), |ΔpH| p95 "
          f"{a['abs_dph_p95']:.1e}, |Δlog10 p| p95 {a['abs_dlog10_p_main_gas_p95']:.1e}; wrote {args.out}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
