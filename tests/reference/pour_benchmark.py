#!/usr/bin/env python3
"""Whole-job speed of offgas against PHREEQC: one pour, both orders, as a user meets it.

For each pair of batch files (a container and a stream, data/demo by default) it times

* offgas: the whole `offgas check CONTAINER --add STREAM --format json` process (start-up,
  embedded data, both batches alone, both orders of pouring with refinement of the worst
  point, the heat of each state and the re-solve at the temperature it brings, boiling,
  pressure, room, findings, JSON), N runs;
* PHREEQC: a fresh Python process per run that does the equivalent job through the
  `phreeqc` package (IPhreeqc): import, load phreeqc.dat, read offgas's data files and the
  two batch files, turn their contents into family and strong-ion totals, build both batches
  as SOLUTIONs, mix them with MIX at every fraction of offgas's scan (src/pour/path.rs `SCAN`),
  both orders, each mixture at the volume-weighted temperature of what has met and with a
  fixed-volume GAS_PHASE equal to the container's headspace at that point, and read pH and
  the gases' partial pressures back into Python. N runs.

The PHREEQC set-up is make_golden.py's "offgas constants" one: offgas's own pKa, ionization
enthalpies, Henry's law constants and Kw(T) from data/species.yaml, only offgas's species,
Davies for ions and gamma = 1 for neutral species, every family a non-reacting copy under an
element name of its own (no redox). Families make_golden.py does not set up (tris, citrate,
sulfamate, ...) are copied here the same way. The database is phreeqc.dat, used as host for
H2O, H+ and OH- only (their constants are replaced by offgas's): the offgas-constants
set-up needs its Davies branch (llnl.dat's b-dot model gives gamma = 1 to every species
defined without -llnl_gamma), and no database set-up of make_golden.py carries tris, citrate
or sulfamate, which the demo pairs contain.

Prints per pair both medians and quartiles, the ratio PHREEQC / offgas, where PHREEQC's time
goes, and an agreement check at the end of the pour as written (pH and the main gas's log10
partial pressure on both sides), so that nobody compares two different jobs.

Usage: python tests/reference/pour_benchmark.py [--n 30] [--offgas PATH]
           [--pairs cyanide,ammonium,sulfide,citrate | CONTAINER.yaml:STREAM.yaml,...]
           [--json-out FILE]
"""

from __future__ import annotations

import json
import math
import re
import sys
import time
from pathlib import Path

# The harness's own modules (argparse, os, shutil, statistics, subprocess, tempfile) are
# imported in main(), so that the PHREEQC job's process, which imports this module, does not
# pay for them.

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
DEMO = ROOT / "data" / "demo"
PATH_RS = ROOT / "src" / "pour" / "path.rs"
DB = "phreeqc.dat"

# The demo pairs (data/demo/scenario.yaml): name -> (container, stream).
PAIRS = {
    "cyanide": ("carboy-cyanide-plating.yaml", "stream-acid-descale.yaml"),
    "ammonium": ("carboy-ammonium-buffer.yaml", "stream-caustic-wash.yaml"),
    "sulfide": ("carboy-acid-etch.yaml", "stream-sulfide-strip.yaml"),
    "citrate": ("carboy-basic-rinse.yaml", "stream-citrate-rinse.yaml"),
}
# Copy element names for families and strong ions make_golden.py has no copy for
# (PHREEQC element names: a capital and lower-case letters; none is in phreeqc.dat).
EXTRA_ELEMENTS = {"tris": "Trs", "citrate": "Ctr", "sulfamate": "Smt"}

# Agreement thresholds of the check: it shows that both sides ran the same job; the
# accuracy test is tests/reference_golden.rs (against golden.json).
AGREE_PH = 0.1
AGREE_LOGP = 0.1

HOW_COUNTED = (
    "PHREEQC: each batch is speciated on its own first (one initial-solution calculation: "
    "SOLUTION with the charge balance on H+, no gas); then each mixture is one batch-reaction "
    "calculation: MIX of the two solutions at the fraction, equilibrated with its fixed-volume "
    "GAS_PHASE at the mixing temperature. The counts printed per pair are read from PHREEQC's "
    "selected output (state i_soln and react), not assumed. No heat: PHREEQC has no heat of "
    "mixing, so every mixture stays at the volume-weighted temperature of what has met. "
    "offgas: each state is one solve of liquid and headspace together, in one system; each "
    "batch is solved alone; per order, one state per scan point plus at most REFINE_STEPS "
    "states refining the worst point; each state is solved again at the temperature its heat "
    "of reaction and dilution brings it to (when that is 1e-3 K or more away); and the end, "
    "the worst point, the other order's worst point and the container alone once more, warmer "
    "by the boiling margin, unless the liquid already boils. The CLI does not report its solve "
    "count, so only its bounds are given."
)


# --------------------------------------------------------------------------------------
# The PHREEQC job (runs in a fresh process: `python -c "import pour_benchmark; ..."`)
# --------------------------------------------------------------------------------------
def _number_unit(text, what):
    m = re.match(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$", str(text))
    if not m:
        raise ValueError(f"cannot read {what} {text!r}")
    return float(m.group(1)), m.group(2).replace(" ", "")


def _litres(text):
    v, u = _number_unit(text, "volume")
    return v * {"l": 1.0, "dm3": 1.0, "ml": 1e-3, "cm3": 1e-3, "m3": 1e3}[u.lower()]


def _celsius(text):
    v, u = _number_unit(text, "temperature")
    if u in ("°C", "C", "degC", "℃", "ºC"):
        return v
    if u == "K":
        return v - 273.15
    if u in ("°F", "F", "degF"):
        return (v - 32.0) * 5.0 / 9.0
    raise ValueError(f"unknown temperature unit in {text!r}")


class Substances:
    """data/substances.yaml: names, synonyms, formulas and CAS numbers to entries."""

    def __init__(self, doc):
        self.by_key = {}
        self.by_name = {}
        for s in doc["substances"]:
            self.by_name[s["name"]] = s
            for k in [s["name"], *s.get("synonyms", []), s.get("formula"), s.get("cas")]:
                if k:
                    self.by_key.setdefault(str(k).strip().lower(), s)

    def find(self, name):
        s = self.by_key.get(str(name).strip().lower())
        if s is None:
            raise ValueError(f"unknown substance {name!r}")
        return s

    def mol_per_ml(self, s):
        """Mol of the entry (a liquid, or a solution's solute) per mL, and the entry that gives."""
        if s["state"] == "solution":
            solute = self.by_name[s["solution_of"]]
            g = float(s["density"]["value"]) * float(s["mass_percent"]["value"]) / 100.0
            return g / float(solute["molar_mass"]), solute
        if "density" not in s:
            raise ValueError(f"{s['name']}: a volume needs a liquid or a solution")
        return float(s["density"]["value"]) / float(s["molar_mass"]), s


def batch_totals(path, subs):
    """A batch file as offgas's engine sees it: mol of each family and strong ion (liquid
    and headspace together), liquid volume, temperature, and for a container capacity and
    closure. Components that give nothing (solvents) are inert and left out."""
    import yaml
    doc = yaml.load(Path(path).read_text(encoding="utf-8"), Loader=_LOADER)
    vl = _litres(doc["volume"])
    out = {"file": str(path), "name": doc.get("name", ""), "vl": vl,
           "t": _celsius(doc.get("temperature", "25 °C")),
           "capacity": _litres(doc["capacity"]) if "capacity" in doc else None,
           "closure": doc.get("closure", "sealed"), "families": {}, "ions": {}}
    for item in doc.get("contents") or []:
        if "substance" in item:
            name, amount = item["substance"], item["amount"]
        else:
            (name, amount), = item.items()
        s = subs.find(name)
        v, u = _number_unit(amount, "amount")
        ul = u.lower()
        giver, per = s, None  # per: mol of the giving entry
        if u == "M" or ul in ("mol/l", "mol/dm3"):
            per = v * vl
        elif u == "mM" or ul == "mmol/l":
            per = v / 1e3 * vl
        elif ul in ("µmol/l", "umol/l"):
            per = v / 1e6 * vl
        elif ul in ("g/l", "kg/m3", "mg/l", "%w/v", "%(w/v)", "g", "kg", "mg"):
            grams = {"g/l": v * vl, "kg/m3": v * vl, "mg/l": v / 1e3 * vl, "%w/v": 10 * v * vl,
                     "%(w/v)": 10 * v * vl, "g": v, "kg": v * 1e3, "mg": v / 1e3}[ul]
            if s["state"] == "solution":
                raise ValueError(f"{name}: a commercial solution takes a volume")
            per = grams / float(s["molar_mass"]) if s.get("gives") else 0.0
        elif ul in ("mol", "mmol"):
            per = v if ul == "mol" else v / 1e3
        elif ul in ("ml/l", "%v/v", "%(v/v)", "ml", "l"):
            ml = {"ml/l": v * vl, "%v/v": 10 * v * vl, "%(v/v)": 10 * v * vl, "ml": v, "l": v * 1e3}[ul]
            if not s.get("gives") and s["state"] != "solution":
                per = 0.0
            else:
                k, giver = subs.mol_per_ml(s)
                per = k * ml
        elif ul in ("%w/w", "%(w/w)", "wt%", "%wt", "%"):
            if s.get("gives") or s["state"] == "solution":
                raise ValueError(f"{name}: % w/w needs offgas's density tables; not supported here")
            per = 0.0  # an inert solvent: nothing for the speciation
        else:
            raise ValueError(f"{name}: unknown unit in {amount!r}")
        contribs = [(giver, per)]
        for extra in s.get("also_contains") or []:
            contribs.append((subs.by_name[extra["substance"]], per * float(extra["per_mole"])))
        for ent, n in contribs:
            gives = ent.get("gives") or {}
            for fid, k in (gives.get("families") or {}).items():
                out["families"][fid] = out["families"].get(fid, 0.0) + n * float(k)
            for iid, k in (gives.get("ions") or {}).items():
                out["ions"][iid] = out["ions"].get(iid, 0.0) + n * float(k)
    return out


def _charge(z):
    z = int(round(z))
    return "" if z == 0 else ("+" if z == 1 else "-" if z == -1 else f"{z:+d}")


def copy_setup(mg, og, families, ions):
    """Copy element, gram formula weight and gas phase name of every family and ion of the
    job, and the PHREEQC definitions of those make_golden.py has no copy for (written the
    way make_golden.offgas_definitions writes its own)."""
    elem, gfw, gas_of = {}, {}, {}
    master_lines, species_lines, phase_lines = [], [], []
    extras = sorted(f for f in families if f not in mg.COPIES and f not in EXTRA_ELEMENTS)
    for fid in sorted(families):
        fam = og.family(fid)
        if fid in mg.COPIES:
            cp = mg.COPIES[fid]
            elem[fid], gfw[fid] = cp["elem"], og.molar_mass(fid)
            if cp["gas"]:
                gas_of[fid] = cp["gas"] + "(g)"
            continue
        if fid in EXTRA_ELEMENTS:
            e = EXTRA_ELEMENTS[fid]
        else:  # any other family: Yqaa, Yqab, ... (no such element in any database)
            i = extras.index(fid)
            e = "Yq" + chr(97 + i // 26) + chr(97 + i % 26)
        elem[fid], gfw[fid] = e, og.molar_mass(fid)
        zs = [s["charge"] for s in fam["species"]]
        names = []
        for z in zs:
            h = z - zs[-1]
            names.append(("H" + (str(h) if h > 1 else "") if h else "") + e + _charge(z))
        master = names[-1]
        master_lines.append(f"    {e} {master} 0 {gfw[fid]!r} {gfw[fid]!r}")
        species_lines += [f"{master} = {master}", "    -log_k 0"]
        if zs[-1] == 0:
            species_lines.append("    -gamma 0 0")
        n = len(names) - 1
        for j in range(n):
            steps = fam["steps"][j:]
            log_k = sum(float(s["pka"]) for s in steps)
            dh = -sum(float(s["dh"]) for s in steps)
            species_lines.append(f"{master} + {zs[j] - zs[-1]:g} H+ = {names[j]}")
            species_lines.append("    " + mg._analytic_vant_hoff(log_k, dh, og))
            if zs[j] == 0:
                species_lines.append("    -gamma 0 0")
        v = fam.get("volatile")
        if v:
            neutral = names[[s["formula"] for s in fam["species"]].index(v["species"])]
            gas_of[fid] = neutral + "(g)"
            phase_lines += [f"{neutral}(g)", f"    {neutral} = {neutral}", "    " + mg._analytic_vant_hoff(
                math.log10(float(v["hcp"]) * og.p_std / 1000.0), -og.r * float(v["hcp_b"]) / 1000.0, og)]
    for iid in sorted(ions):
        gfw[iid] = float(og.ions[iid]["molar_mass"])
        if iid in mg.ION_COPIES:
            elem[iid] = mg.ION_COPIES[iid]["elem"]
            continue
        z = int(og.ions[iid]["charge"])
        e = "Yi" + chr(97 + sorted(ions).index(iid) // 26) + chr(97 + sorted(ions).index(iid) % 26)
        elem[iid] = e
        sp = e + _charge(z)
        master_lines.append(f"    {e} {sp} 0 {gfw[iid]!r} {gfw[iid]!r}")
        species_lines += [f"{sp} = {sp}", "    -log_k 0"]
    text = ""
    if master_lines:
        text = ("SOLUTION_MASTER_SPECIES\n" + "\n".join(master_lines) + "\nSOLUTION_SPECIES\n"
                + "\n".join(species_lines) + "\n")
        if phase_lines:
            text += "PHASES\n" + "\n".join(phase_lines) + "\n"
    combined = {}
    for cid in og.combined_in(families):
        if og.combined[cid].get("volatile"):
            combined[cid] = mg.COMBINED_COPIES[cid]["formula"] + "(g)"
    return elem, gfw, gas_of, combined, text


def mixtures(a, b, scan):
    """The states of both orders at the scan's fractions, as offgas's Mixture::pour makes
    them: the vessel's totals plus f times the poured batch's, liquid volumes added,
    headspace = capacity - liquid, temperature the volume-weighted mean."""
    cap = a["capacity"]
    out = []
    for order, (v, p) in (("as_written", ("A", "B")), ("other_way", ("B", "A"))):
        bv, bp = (a, b) if v == "A" else (b, a)
        for f in scan:
            if f == 0.0 and bv["vl"] <= 0.0:
                continue
            vl = bv["vl"] + f * bp["vl"]
            t = (bv["t"] * bv["vl"] + bp["t"] * f * bp["vl"]) / vl
            fams = set(bv["families"]) | (set(bp["families"]) if f > 0 else set())
            out.append({"order": order, "f": f, "vessel": v, "poured": p, "vl": vl,
                        "vg": max(cap - vl, 0.0), "t": t, "families": fams})
    return out


def job_input(mg, og, a, b, scan, extra_end_t=None):
    """Definitions and the PHREEQC input of the whole job, and the gases punched."""
    families = set(a["families"]) | set(b["families"])
    ions = set(a["ions"]) | set(b["ions"])
    elem, gfw, gas_of, combined, extra_defs = copy_setup(mg, og, families, ions)
    gases = sorted(set(gas_of.values()) | set(combined.values()))
    names = {g: og.gas(f) for f, g in gas_of.items()}
    names.update({g: og.combined[cid]["volatile"]["gas"] for cid, g in combined.items()})
    pu = mg.Punch()
    pu.add("ph", '-LA("H+")')
    pu.add("mu", "MU")
    pu.add("tc", "TC")
    for g in gases:
        pu.add(f"si:{g}", f'SI("{g}")')
    parts = [pu.block()]
    for n, bt in ((1, a), (2, b)):
        conc = [(elem[f], c / bt["vl"], gfw[f]) for f, c in sorted(bt["families"].items())]
        conc += [(elem[i], c / bt["vl"], gfw[i]) for i, c in sorted(bt["ions"].items())]
        parts.append(mg.solution_block(n, {"t": bt["t"], "vl": bt["vl"]}, conc))
    parts.append("END\n")
    mixes = mixtures(a, b, scan)
    if extra_end_t is not None:  # the agreement check only: the end of the pour at offgas's T
        end = dict(next(m for m in mixes if m["order"] == "as_written" and m["f"] == 1.0))
        end.update(order="check", t=extra_end_t)
        mixes.append(end)
    sealed = a["closure"] != "open"  # offgas: an open vessel's liquid keeps its gas
    for k, m in enumerate(mixes):
        n = 3 + k
        num = {"A": 1, "B": 2}
        L = [f"MIX {n}", f"    {num[m['vessel']]} 1.0"]
        if m["f"] > 0:
            L.append(f"    {num[m['poured']]} {m['f']!r}")
        L += [f"REACTION_TEMPERATURE {n}", f"    {m['t']!r}"]
        phases = [gas_of[f] for f in sorted(m["families"]) if f in gas_of]
        phases += [g for cid, g in combined.items()
                   if all(og.combined[cid][s]["family"] in m["families"] for s in ("first", "second"))]
        if sealed and phases and m["vg"] > 0:
            L += [f"GAS_PHASE {n}", "    -fixed_volume", f"    -volume {m['vg']!r}",
                  f"    -temperature {m['t']!r}"] + [f"    {g} 0" for g in phases]
        parts.append("\n".join(L) + "\nEND\n")
    return extra_defs, "".join(parts), pu, mixes, gases, names


_LOADER = None


def phreeqc_job(container, stream, scan, extra_end_t=None):
    """The whole PHREEQC job; prints one JSON line (results and where the time went)."""
    global _LOADER
    marks = [("start", time.perf_counter())]
    sys.dont_write_bytecode = False
    import yaml
    import make_golden as mg  # imports phreeqc
    marks.append(("import", time.perf_counter()))
    # libyaml's loader: the pure-Python one takes most of a second on offgas's data files,
    # which would turn this into a YAML benchmark. make_golden.Offgas uses yaml.safe_load.
    _LOADER = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
    yaml.safe_load = lambda s: yaml.load(s, Loader=_LOADER)
    og = mg.Offgas()
    subs = Substances(yaml.load((mg.ROOT / "data" / "substances.yaml").read_text(encoding="utf-8"), Loader=_LOADER))
    a = batch_totals(container, subs)
    b = batch_totals(stream, subs)
    extra_defs, text, pu, mixes, gases, gas_names = job_input(mg, og, a, b, scan, extra_end_t)
    defs = mg.offgas_definitions(og) + extra_defs
    marks.append(("data_and_input", time.perf_counter()))
    p = mg.phreeqc.Phreeqc()
    if p.LoadBuiltInDatabase(DB):
        raise RuntimeError(p.GetErrorString())
    marks.append(("database", time.perf_counter()))
    if p.RunString(defs + "END\n"):
        raise RuntimeError(p.GetErrorString())
    marks.append(("definitions", time.perf_counter()))
    if p.RunString(text):
        raise RuntimeError(p.GetErrorString())
    marks.append(("run", time.perf_counter()))
    so = p.GetSelectedOutput()
    states = [str(s).strip() for s in so["state"]]
    rows = pu.rows(p)
    results = []
    for m, r in zip(mixes, rows):
        results.append({"order": m["order"], "f": m["f"], "t": r["tc"], "ph": r["ph"], "mu": r["mu"],
                        "vg": m["vg"], "vl": m["vl"],
                        "gases_atm": {gas_names[g]: (10 ** r[f"si:{g}"] if r[f"si:{g}"] > -99 else 0.0)
                                      for g in gases}})
    marks.append(("read_output", time.perf_counter()))
    assert len(rows) == len(mixes), (len(rows), len(mixes))
    out = {"results": results, "gas_copy_names": gases,
           "batches": {"container": a, "stream": b},
           "calculations": {"initial_solution": states.count("i_soln"), "batch_reaction": states.count("react")},
           "phases_s": {marks[i][0]: marks[i][1] - marks[i - 1][1] for i in range(1, len(marks))}}
    sys.stdout.write(json.dumps(out, default=sorted) + "\n")


# --------------------------------------------------------------------------------------
# The benchmark (parent process)
# --------------------------------------------------------------------------------------
def read_scan(path=PATH_RS):
    """offgas's scan fractions and refinement steps, from the source of the binary timed."""
    src = path.read_text(encoding="utf-8")
    m = re.search(r"pub const SCAN\s*:\s*\[f64;\s*(\d+)\]\s*=\s*\[(.*?)\];", src, re.S)
    scan = [float(x) for x in m.group(2).replace("\n", " ").split(",") if x.strip()]
    assert len(scan) == int(m.group(1)), "SCAN length"
    r = re.search(r"const REFINE_STEPS\s*:\s*usize\s*=\s*(\d+)", src)
    return scan, int(r.group(1)) if r else None


def quartiles(xs):
    import statistics
    q = statistics.quantiles(xs, n=4, method="inclusive") if len(xs) > 1 else [xs[0]] * 3
    return {"q1": q[0], "median": statistics.median(xs), "q3": q[2], "min": min(xs), "max": max(xs)}


def child_env(pycache):
    import os
    env = dict(os.environ)
    env["PYTHONPATH"] = str(HERE) + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    # Bytecode is cached (as for any installed program) but outside the repository: with a
    # prefix, every module's .pyc (standard library included) lives under it, so writing
    # must be allowed or each run would compile the standard library from source.
    env["PYTHONPYCACHEPREFIX"] = pycache
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    return env


def phreeqc_cmd(container, stream, scan, extra_end_t=None):
    call = f"phreeqc_job({str(container)!r}, {str(stream)!r}, {scan!r}, {extra_end_t!r})"
    return [sys.executable, "-c", f"from pour_benchmark import phreeqc_job; {call}"]


def run_timed(cmd, env=None, ok=(0,)):
    import subprocess
    t0 = time.perf_counter()
    r = subprocess.run(cmd, capture_output=True, text=True, env=env)
    dt = time.perf_counter() - t0
    if r.returncode not in ok:
        raise RuntimeError(f"{' '.join(cmd[:3])} ... exited {r.returncode}:\n{r.stderr[-3000:]}")
    return dt, r.stdout


def resolve_pairs(spec):
    out = []
    for item in spec.split(","):
        item = item.strip()
        if not item:
            continue
        if item in PAIRS:
            c, s = PAIRS[item]
            out.append((item, DEMO / c, DEMO / s))
        elif ":" in item:
            c, s = item.split(":", 1)
            out.append((f"{Path(c).stem}+{Path(s).stem}", Path(c).resolve(), Path(s).resolve()))
        else:
            raise SystemExit(f"unknown pair {item!r}: one of {', '.join(PAIRS)} or CONTAINER.yaml:STREAM.yaml")
    return out


def main_gas(state):
    """The gas of offgas's state that matters most: highest ratio to its short-term level
    (then to its IDLH, then partial pressure)."""
    gases = state.get("gases") or []
    if not gases:
        return None
    return max(gases, key=lambda g: (g.get("limit_ratio") or 0.0, g.get("idlh_ratio") or 0.0,
                                      g["partial_pressure_kpa"]))["formula"]


def log10_atm_of_kpa(kpa):
    return math.log10(kpa / 101.325) if kpa and kpa > 0 else float("-inf")


def log10_atm(p):
    return math.log10(p) if p and p > 0 else float("-inf")


def agreement(og_doc, ph_check, pair_rows):
    """The end of the pour as written, both sides, and the main gas's peak along it."""
    end = og_doc["end_state"]
    gas = main_gas(end)
    timed_end = next(r for r in pair_rows if r["order"] == "as_written" and r["f"] == 1.0)
    chk = next(r for r in ph_check if r["order"] == "check")
    out = {"main_gas": gas, "offgas_end_temperature_c": end["temperature_c"],
           "phreeqc_end_temperature_c": chk["t"], "mixing_temperature_c": timed_end["t"],
           "ph": {"offgas": end["ph"], "phreeqc": chk["ph"], "phreeqc_at_mixing_t": timed_end["ph"]},
           "ionic_strength": {"offgas": end["ionic_strength"], "phreeqc": chk["mu"]}}
    out["abs_dph"] = abs(end["ph"] - chk["ph"])
    ok = out["abs_dph"] <= AGREE_PH
    if gas:
        g_og = next(g for g in end["gases"] if g["formula"] == gas)
        lp_og = log10_atm_of_kpa(g_og["partial_pressure_kpa"])
        lp_ph = log10_atm(chk["gases_atm"].get(gas, 0.0))
        out["log10_p_atm"] = {"offgas": lp_og, "phreeqc": lp_ph,
                              "phreeqc_at_mixing_t": log10_atm(timed_end["gases_atm"].get(gas, 0.0))}
        out["abs_dlog10_p"] = abs(lp_og - lp_ph)
        ok = ok and out["abs_dlog10_p"] <= AGREE_LOGP
        peak = next((p for p in og_doc["poured_as_written"].get("gas_peaks", []) if p["formula"] == gas), None)
        fw = [r for r in pair_rows if r["order"] == "as_written"]
        best = max(fw, key=lambda r: r["gases_atm"].get(gas, 0.0))
        out["peak_as_written"] = {
            "offgas_ppm": peak["headspace_ppm"] if peak else None,
            "offgas_fraction": peak["fraction_added"] if peak else None,
            "phreeqc_ppm": best["gases_atm"].get(gas, 0.0) * 1e6, "phreeqc_fraction": best["f"],
            "note": "offgas: scan plus refinement, at the temperature the heat brings; "
                    "PHREEQC: scan points only, at the mixing temperature",
        }
    out["agree"] = ok
    return out


def fmt_s(x):
    return f"{x * 1e3:.1f} ms" if x < 10 else f"{x:.2f} s"


def main(argv=None) -> int:
    import argparse
    import os
    import shutil
    import statistics
    import subprocess
    import tempfile
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--n", type=int, default=30, help="timed runs per side and pair (default 30)")
    ap.add_argument("--offgas", type=Path, help="an offgas binary (default: cargo build --release)")
    ap.add_argument("--pairs", default=",".join(PAIRS),
                    help=f"comma list of {', '.join(PAIRS)} or CONTAINER.yaml:STREAM.yaml (default: all four)")
    ap.add_argument("--json-out", type=Path, help="write the results here as JSON")
    args = ap.parse_args(argv)
    sys.dont_write_bytecode = True
    pairs = resolve_pairs(args.pairs)
    if args.n < 1 or not pairs:
        raise SystemExit("nothing to do")

    with tempfile.TemporaryDirectory(prefix="pourbench-") as tmp:
        if args.offgas:
            binary = args.offgas.resolve()
            built = "given"
        else:
            r = subprocess.run(["cargo", "build", "--release", "--quiet"], cwd=ROOT, capture_output=True, text=True)
            if r.returncode != 0:
                print(r.stderr[-4000:], file=sys.stderr)
                print("cargo build --release failed (someone mid-edit? rerun)", file=sys.stderr)
                return 1
            # a private copy: a rebuild by someone else must not change the binary mid-run
            binary = Path(tmp) / "offgas"
            shutil.copy2(ROOT / "target" / "release" / "offgas", binary)
            built = "cargo build --release"
        scan, refine_steps = read_scan()
        env = child_env(str(Path(tmp) / "pycache"))
        import phreeqc  # noqa: F401  (versions for the record)
        from importlib.metadata import version as pkg_version
        doc = {"generator": "tests/reference/pour_benchmark.py", "n": args.n, "offgas_binary": built,
               "scan_points": len(scan), "refine_steps": refine_steps, "database": DB,
               "phreeqc_package_version": pkg_version("phreeqc"),
               "python": sys.version.split()[0], "cpus": os.cpu_count(),
               "how_counted": HOW_COUNTED, "pairs": []}
        print(f"offgas {built}; PHREEQC {pkg_version('phreeqc')} ({DB} as host, offgas constants); "
              f"scan from src/pour/path.rs: {len(scan)} points, refinement at most {refine_steps} steps; "
              f"n = {args.n} per side; {os.cpu_count()} CPUs")
        if args.offgas:
            print("  (--offgas given: src/pour/path.rs must match the binary's source for the two jobs to be the same)")
        for name, container, stream in pairs:
            og_cmd = [str(binary), "check", str(container), "--add", str(stream), "--format", "json"]
            # untimed: results, the agreement check, and warm caches on both sides
            _, out = run_timed(og_cmd, ok=(0, 3, 4))
            og_doc = json.loads(out)
            end_t = og_doc["end_state"]["temperature_c"]
            _, out = run_timed(phreeqc_cmd(container, stream, scan, end_t), env=env)
            check = json.loads(out)
            _, out = run_timed(phreeqc_cmd(container, stream, scan), env=env)
            ph_doc = json.loads(out)
            # cross-check: the moles each side read from the batch files
            mol_check = check_moles(og_doc, ph_doc)
            t_og, t_ph, phases = [], [], []
            for _ in range(args.n):  # interleaved, so that noise hits both alike
                t_og.append(run_timed(og_cmd, ok=(0, 3, 4))[0])
                dt, out = run_timed(phreeqc_cmd(container, stream, scan), env=env)
                t_ph.append(dt)
                phases.append(json.loads(out)["phases_s"])
            qo, qp = quartiles(t_og), quartiles(t_ph)
            ph_phase = {k: statistics.median(p[k] for p in phases) for k in phases[0]}
            ph_phase["interpreter_start_and_exit"] = max(qp["median"] - sum(ph_phase.values()), 0.0)
            core = ph_phase["database"] + ph_phase["definitions"] + ph_phase["run"] + ph_phase["read_output"]
            calc = ph_doc["calculations"]
            n_states = sum(1 for r in ph_doc["results"])
            agree = agreement(og_doc, check["results"], ph_doc["results"])
            lo = 2 + n_states
            hi = 2 + 2 * (len(scan) + (refine_steps or 0)) * 2 + 4
            rec = {"pair": name, "container": str(container.relative_to(ROOT)) if container.is_relative_to(ROOT) else str(container),
                   "stream": str(stream.relative_to(ROOT)) if stream.is_relative_to(ROOT) else str(stream),
                   "verdict": og_doc["severity"], "offgas_s": qo, "phreeqc_s": qp,
                   "ratio_phreeqc_over_offgas": qp["median"] / qo["median"],
                   "ratio_phreeqc_core_over_offgas": core / qo["median"],
                   "phreeqc_phases_median_s": ph_phase, "phreeqc_calculations": calc,
                   "phreeqc_mixtures": n_states, "offgas_solves_bounds": [lo, hi],
                   "batch_moles_check": mol_check, "agreement": agree}
            doc["pairs"].append(rec)
            print_pair(rec)
        print("How each side counts an equilibrium:")
        for line in wrap(HOW_COUNTED, 92):
            print("  " + line)
        if args.json_out:
            args.json_out.write_text(json.dumps(doc, indent=1, sort_keys=True) + "\n")
        ratios = [p["ratio_phreeqc_over_offgas"] for p in doc["pairs"]]
        bad = [p["pair"] for p in doc["pairs"] if not p["agreement"]["agree"] or not p["batch_moles_check"]["ok"]]
        print(f"summary: {len(doc['pairs'])} pairs, n = {args.n}; whole job PHREEQC/offgas median ratio "
              f"{min(ratios):.0f}-{max(ratios):.0f} (offgas {fmt_s(min(p['offgas_s']['median'] for p in doc['pairs']))}-"
              f"{fmt_s(max(p['offgas_s']['median'] for p in doc['pairs']))}, PHREEQC "
              f"{fmt_s(min(p['phreeqc_s']['median'] for p in doc['pairs']))}-"
              f"{fmt_s(max(p['phreeqc_s']['median'] for p in doc['pairs']))}); agreement "
              + ("ok on every pair" if not bad else "FAILED on " + ", ".join(bad))
              + (f"; wrote {args.json_out}" if args.json_out else ""))
        return 0 if not bad else 1


def check_moles(og_doc, ph_doc):
    """Family and ion totals: offgas's component moles (its JSON) times data/substances.yaml's
    `gives`, against what the PHREEQC job read from the batch files."""
    import yaml
    subs = Substances(yaml.load((ROOT / "data" / "substances.yaml").read_text(encoding="utf-8"),
                                Loader=getattr(yaml, "CSafeLoader", yaml.SafeLoader)))
    worst = 0.0
    for side in ("container", "stream"):
        want = {}
        for c in og_doc[side]["components"]:
            s = subs.find(c["substance"])
            contribs = [(s, c["moles"])]
            if s["state"] == "solution":
                contribs = [(subs.by_name[s["solution_of"]], c["moles"])]
            for extra in s.get("also_contains") or []:
                contribs.append((subs.by_name[extra["substance"]], c["moles"] * float(extra["per_mole"])))
            for ent, n in contribs:
                g = ent.get("gives") or {}
                for kind in ("families", "ions"):
                    for k, v in (g.get(kind) or {}).items():
                        want[(kind, k)] = want.get((kind, k), 0.0) + n * float(v)
        got = {("families", k): v for k, v in ph_doc["batches"][side]["families"].items()}
        got.update({("ions", k): v for k, v in ph_doc["batches"][side]["ions"].items()})
        for key in set(want) | set(got):
            a, b = want.get(key, 0.0), got.get(key, 0.0)
            if max(a, b) > 0:
                worst = max(worst, abs(a - b) / max(a, b))
    return {"ok": worst <= 1e-9, "max_rel_diff": worst}


def wrap(text, width):
    words, line, out = text.split(), "", []
    for w in words:
        if line and len(line) + 1 + len(w) > width:
            out.append(line)
            line = w
        else:
            line = f"{line} {w}" if line else w
    return out + ([line] if line else [])


def print_pair(rec):
    qo, qp, a = rec["offgas_s"], rec["phreeqc_s"], rec["agreement"]
    ph = rec["phreeqc_phases_median_s"]
    calc = rec["phreeqc_calculations"]
    print(f"\n{rec['pair']}: {Path(rec['container']).name} + {Path(rec['stream']).name} (offgas: {rec['verdict']})")
    print(f"  offgas  (whole `offgas check --format json` process): median {fmt_s(qo['median'])}, "
          f"quartiles {fmt_s(qo['q1'])}-{fmt_s(qo['q3'])}; {rec['offgas_solves_bounds'][0]}-"
          f"{rec['offgas_solves_bounds'][1]} solves")
    print(f"  PHREEQC (whole Python process):                 median {fmt_s(qp['median'])}, "
          f"quartiles {fmt_s(qp['q1'])}-{fmt_s(qp['q3'])}; {rec['phreeqc_mixtures']} mixtures, "
          f"{calc['initial_solution']} + {calc['batch_reaction']} calculations")
    print(f"    where PHREEQC's time goes (medians): interpreter start-up and exit {fmt_s(ph['interpreter_start_and_exit'])}, "
          f"imports {fmt_s(ph['import'])}, data and input {fmt_s(ph['data_and_input'])}, "
          f"database {fmt_s(ph['database'])}, definitions {fmt_s(ph['definitions'])}, "
          f"RunString {fmt_s(ph['run'])}, reading output {fmt_s(ph['read_output'])}")
    n_calc = calc["initial_solution"] + calc["batch_reaction"]
    print(f"    RunString per PHREEQC calculation: {ph['run'] / n_calc * 1e6:.0f} µs; offgas whole process per solve: "
          f"{qo['median'] / rec['offgas_solves_bounds'][1] * 1e6:.0f}-{qo['median'] / rec['offgas_solves_bounds'][0] * 1e6:.0f} µs "
          f"(start-up and everything else included)")
    print(f"  ratio PHREEQC/offgas: {rec['ratio_phreeqc_over_offgas']:.0f} (whole process); "
          f"{rec['ratio_phreeqc_core_over_offgas']:.1f} counting on PHREEQC's side only its database load, "
          f"definitions, RunString and reading the output")
    m = rec["batch_moles_check"]
    print(f"  same batches: family and ion totals {'agree' if m['ok'] else 'DIFFER'} "
          f"(largest relative difference {m['max_rel_diff']:.1e})")
    print(f"  end of the pour as written (offgas {a['offgas_end_temperature_c']:.2f} °C after its heat; PHREEQC "
          f"re-solved at that temperature, untimed; timed run at the mixing {a['mixing_temperature_c']:.2f} °C):")
    print(f"    pH: offgas {a['ph']['offgas']:.3f}, PHREEQC {a['ph']['phreeqc']:.3f} "
          f"(at mixing T {a['ph']['phreeqc_at_mixing_t']:.3f}); |ΔpH| {a['abs_dph']:.3f}")
    if a["main_gas"]:
        g, lp = a["main_gas"], a["log10_p_atm"]
        print(f"    log10 p({g}/atm): offgas {lp['offgas']:.3f}, PHREEQC {lp['phreeqc']:.3f} "
              f"(at mixing T {lp['phreeqc_at_mixing_t']:.3f}); |Δ| {a['abs_dlog10_p']:.3f}")
        pk = a["peak_as_written"]
        if pk["offgas_ppm"] is not None:
            print(f"    peak {g} while pouring: offgas {pk['offgas_ppm']:.4g} ppm at {100 * pk['offgas_fraction']:.1f} % "
                  f"added (refined), PHREEQC {pk['phreeqc_ppm']:.4g} ppm at {100 * pk['phreeqc_fraction']:.1f} % "
                  f"(scan points, mixing T)")
    else:
        print("    no gas at the end (no volatile family in either batch): pH only")
    print(f"    agreement {'ok' if a['agree'] else 'NOT OK'} (|ΔpH| <= {AGREE_PH}, |Δlog10 p| <= {AGREE_LOGP})")


if __name__ == "__main__":
    sys.exit(main())
