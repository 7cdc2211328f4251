#!/usr/bin/env python3
"""Independent cross-check of the tapline engine against OpenDSS (dss-python 0.15.7).

For a set of seeded, deterministic networks the script runs `tapline solve JOB.json`, builds the
same circuit in OpenDSS, solves it there and compares:

* fundamental: every load's voltage, each hot leg's current, the neutral conductor's and the
  earth path's current and the panel neutral bar's shift;
* bolted faults at the transformer terminals and at the panel (every case with a transformer);
* harmonics (cases with electronic loads): the neutral conductor's and the earth path's current
  and the neutral bar's voltage at each order, twice: with OpenDSS's own harmonic mode (Load +
  Spectrum) and with explicit Isource elements solved at each harmonic frequency.

Every figure must agree within 1e-6, relative to max(|value|, 1e-3 x a natural scale). See
README.md beside this file for how each element is modelled and why.

Usage: python crosscheck.py          (TAPLINE=path overrides the engine binary)
Only the standard library and dss-python are used.
"""

import cmath
import json
import math
import os
import random
import subprocess
import sys
import tempfile
import time
from pathlib import Path

try:
    from dss import DSS as dss_engine
except ImportError:  # pragma: no cover - set-up problem, not a disagreement
    sys.exit("crosscheck: dss-python is not installed; run tests/opendss/run.sh (it makes the venv)")

HERE = Path(__file__).resolve().parent
REPO = HERE.parent.parent
TOLERANCE = 1e-6          # relative agreement demanded of every figure
FLOOR = 1e-3              # floor of the relative scale, as a fraction of a natural scale
SEED = 2026
N_FUNDAMENTAL = 40        # networks checked at the fundamental (and faults where a transformer)
N_HARMONIC = 12           # further networks with electronic loads (fundamental + harmonics)

# OpenDSS numerics: a stiff source is a Vsource with this series impedance (ohms, R and X), the
# primary of a transformer one with PRIMARY_EPS (referred to the secondary it is smaller by the
# turns ratio squared), and a bolted fault a Fault element of FAULT_R ohms, compensated exactly
# (see fault_current).
STIFF_EPS = 1e-12
PRIMARY_EPS = 1e-11
FAULT_R = 1e-6
SOLID_OHMS = 1e-6         # the engine treats a smaller impedance as a solid connection


def fmt(x):
    """A float as OpenDSS reads it, at full precision."""
    return repr(float(x))


# ---------------------------------------------------------------------------------------------
# The engine
# ---------------------------------------------------------------------------------------------

def tapline_path():
    p = Path(os.environ.get("TAPLINE", "target/debug/tapline"))
    return p if p.is_absolute() else REPO / p


def run_engine(job, workdir, index):
    path = Path(workdir) / f"case{index:02d}.json"
    path.write_text(json.dumps(job, indent=1))
    exe = tapline_path()
    proc = subprocess.run([str(exe), "solve", str(path)], capture_output=True, text=True)
    if proc.returncode != 0:
        raise RuntimeError(f"tapline solve {path.name} exited {proc.returncode}: "
                           f"{proc.stderr.strip() or proc.stdout.strip()}")
    return json.loads(proc.stdout)


# ---------------------------------------------------------------------------------------------
# The jobs
# ---------------------------------------------------------------------------------------------

def legs_of(system):
    if system["kind"] == "split-phase":
        return ["L1", "L2"]
    return ["L1", "L2", "L3"][: system.get("phases", 3)]


def line_to_line(system):
    legs = legs_of(system)
    if len(legs) == 2:
        return ["L1-L2"]
    return ["L1-L2", "L2-L3", "L3-L1"]


def r4(x):
    return float(f"{x:.4g}")


def make_job(rng, name, kind, with_tx, state, earth, loose_ohms=None, electronic=False):
    """One random job of the given shape. `earth` is ohms or None."""
    if kind == "split-phase":
        system = {"kind": "split-phase", "volts_to_neutral": rng.choice([120, 120, 115, 127]),
                  "frequency_hz": 60}
    else:
        system = {"kind": "wye", "phases": 3 if kind == "wye3" else 2,
                  "volts_to_neutral": rng.choice([120, 120, 127, 277]), "frequency_hz": 60}
    job = {"version": 1, "name": name, "system": system}
    if with_tx:
        primary = rng.choice([2400, 7200, 7620, 14400] if kind == "split-phase"
                             else [4160, 12470, 13200, 24940])
        job["transformer"] = {"kva": rng.choice([10, 15, 25, 37.5, 50, 75, 100, 167]),
                              "primary_v": primary,
                              "impedance_pct": r4(rng.uniform(1.2, 4.0)),
                              "x_over_r": r4(rng.uniform(0.5, 5.0))}
    job["service"] = {"hot": {"r_ohm": r4(rng.uniform(0.005, 0.08)),
                              "x_ohm": r4(rng.uniform(0.002, 0.03))},
                      "neutral": {"r_ohm": r4(rng.uniform(0.005, 0.12)),
                                  "x_ohm": r4(rng.uniform(0.002, 0.03))}}
    neutral = {"state": state}
    if state == "loose":
        neutral["ohms"] = loose_ohms if loose_ohms is not None else r4(10 ** rng.uniform(-1.3, 2.7))
    if earth is not None:
        neutral["earth_return_ohms"] = earth
    job["neutral"] = neutral
    v = system["volts_to_neutral"]
    legs, ll = legs_of(system), line_to_line(system)
    loads = []
    for k in range(rng.randint(2, 6)):
        # The first load is always line to neutral so the panel neutral bar is defined.
        across = k > 0 and rng.random() < 0.3
        connect = rng.choice(ll) if across else rng.choice(legs) + "-N"
        load = {"connect": connect}
        if rng.random() < 0.5:
            load["model"] = "resistive"
        else:
            load["model"] = "impedance"
            load["power_factor"] = r4(rng.uniform(0.55, 0.98))
        load["watts"] = r4(rng.uniform(500, 6000) if across else rng.uniform(60, 2500))
        if rng.random() < 0.35:
            load["branch"] = {"r_ohm": r4(rng.uniform(0.02, 0.4)), "x_ohm": r4(rng.uniform(0.003, 0.05))}
        loads.append(load)
    if electronic:
        for k in range(rng.randint(1, 3)):
            across = k > 0 and rng.random() < 0.25
            connect = rng.choice(ll) if across else rng.choice(legs) + "-N"
            rated = v * (2 if across and kind == "split-phase" else math.sqrt(3) if across else 1)
            orders = [3, 5, 7, 9, 11][: rng.randint(2, 5)]
            fractions = [r4(rng.uniform(0.05, 0.9) / (i + 1) ** 0.5) for i in range(len(orders))]
            load = {"connect": connect, "model": "electronic",
                    "watts": r4(rng.uniform(60, 700)),
                    "power_factor": 1.0 if rng.random() < 0.6 else r4(rng.uniform(0.85, 0.99)),
                    "input_min_v": round(0.4 * rated, 1), "input_max_v": round(2.0 * rated, 1),
                    "harmonics": [[h, f] for h, f in zip(orders, fractions)]}
            if rng.random() < 0.35:
                load["branch"] = {"r_ohm": r4(rng.uniform(0.02, 0.4)), "x_ohm": r4(rng.uniform(0.003, 0.05))}
            loads.insert(rng.randint(0, len(loads)), load)
    job["loads"] = loads
    return job


def hand_job():
    """Stiff 120/240 V, 1500 W on L1 and 300 W on L2, open neutral, no earth: 40 V and 200 V."""
    return {"version": 1, "name": "hand check", "system": {"kind": "split-phase",
            "volts_to_neutral": 120, "frequency_hz": 60},
            "service": {"hot": {"r_ohm": 0.0, "x_ohm": 0.0}, "neutral": {"r_ohm": 0.0, "x_ohm": 0.0}},
            "neutral": {"state": "open"},
            "loads": [{"connect": "L1-N", "model": "resistive", "watts": 1500},
                      {"connect": "L2-N", "model": "resistive", "watts": 300}]}


def fundamental_jobs(rng):
    jobs = [hand_job()]
    # The cases the issue names.
    jobs.append(make_job(rng, "split-phase, loose 2 ohm beside 25 ohm earth", "split-phase", True, "loose", 25, 2.0))
    jobs.append(make_job(rng, "split-phase, loose 1000 ohm beside 25 ohm earth", "split-phase", True, "loose", 25, 1000.0))
    jobs.append(make_job(rng, "split-phase, open with 25 ohm earth", "split-phase", True, "open", 25))
    jobs.append(make_job(rng, "split-phase, open, no earth", "split-phase", True, "open", None))
    jobs.append(make_job(rng, "stiff split-phase, loose 2 ohm beside 25 ohm earth", "split-phase", False, "loose", 25, 2.0))
    # Every system x source x neutral state, the earth path drawn at random.
    for kind in ["split-phase", "wye3", "wye2"]:
        for with_tx in [False, True]:
            for state in ["intact", "loose", "open"]:
                earth = rng.choice([None, 5, 10, 25, 100, 300])
                jobs.append(make_job(rng, f"{kind}, {'transformer' if with_tx else 'stiff'}, {state}",
                                     kind, with_tx, state, earth))
    while len(jobs) < N_FUNDAMENTAL:
        kind = rng.choice(["split-phase", "split-phase", "wye3", "wye2"])
        state = rng.choice(["intact", "loose", "open"])
        jobs.append(make_job(rng, f"random {len(jobs)}", kind, rng.random() < 0.7, state,
                             rng.choice([None, None, 5, 25, 100])))
    return jobs


def harmonic_job(rng, index):
    kind = rng.choice(["split-phase", "split-phase", "wye3", "wye2"])
    state = rng.choice(["intact", "loose", "loose", "open"])
    earth = rng.choice([5, 25, 100]) if state == "open" and rng.random() < 0.7 else rng.choice([None, 25])
    return make_job(rng, f"harmonics {index}", kind, rng.random() < 0.7, state, earth, electronic=True)


# ---------------------------------------------------------------------------------------------
# OpenDSS
# ---------------------------------------------------------------------------------------------

def cmd(text):
    dss_engine.Text.Command = text


def circuit():
    return dss_engine.ActiveCircuit


def element_currents(name):
    ck = circuit()
    ck.SetActiveElement(name)
    if ck.ActiveCktElement.Name.lower() != name.lower():
        raise RuntimeError(f"OpenDSS has no element {name}")
    a = ck.ActiveCktElement.Currents
    return [complex(a[i], a[i + 1]) for i in range(0, len(a), 2)]


def element_voltages(name):
    ck = circuit()
    ck.SetActiveElement(name)
    a = ck.ActiveCktElement.Voltages
    return [complex(a[i], a[i + 1]) for i in range(0, len(a), 2)]


def node_voltage(bus, node):
    ck = circuit()
    ck.SetActiveBus(bus)
    nodes = list(ck.ActiveBus.Nodes)
    v = ck.ActiveBus.Voltages
    k = nodes.index(node)
    return complex(v[2 * k], v[2 * k + 1])


def load_admittance(load, system):
    """Y = S*/V_rated^2 of a constant-impedance load (siemens), with its rated voltage."""
    v = system["volts_to_neutral"]
    if load["connect"].endswith("-N"):
        vr = v
    else:
        vr = 2 * v if system["kind"] == "split-phase" else math.sqrt(3) * v
    vr = load.get("rated_v", vr)
    pf = load.get("power_factor", 1.0)
    p = load["watts"]
    q = p * math.sqrt(1 - pf * pf) / pf
    return complex(p, -q) / (vr * vr), vr


def transformer_ohms(tx, system):
    """The engine's full-winding (split-phase) or per-phase (wye) impedance R + jX, ohms, and
    its resistance and reactance in percent."""
    v = system["volts_to_neutral"]
    v_ll = 2 * v if system["kind"] == "split-phase" else math.sqrt(3) * v
    z = tx["impedance_pct"] / 100 * v_ll * v_ll / (tx["kva"] * 1000)
    xr = tx["x_over_r"]
    r = z / math.sqrt(1 + xr * xr)
    pct_r = tx["impedance_pct"] / math.sqrt(1 + xr * xr)
    return complex(r, r * xr), pct_r, pct_r * xr


class Model:
    """One job built in OpenDSS. Node names: S = the source terminals (S.1..S.3, the transformer
    neutral is OpenDSS's ground, node 0); PNL = the panel (PNL.1..3 hot bars, PNL.4 neutral bar);
    LDk = load k's own terminals when it has a branch circuit."""

    def __init__(self, job, index):
        self.job = job
        self.index = index
        self.system = job["system"]
        self.legs = legs_of(self.system)
        self.v = self.system["volts_to_neutral"]
        svc = job["service"]
        self.hot_z = complex(svc["hot"].get("r_ohm", 0), svc["hot"].get("x_ohm", 0))
        self.neu_z = complex(svc["neutral"].get("r_ohm", 0), svc["neutral"].get("x_ohm", 0))
        n = job.get("neutral", {"state": "intact"})
        self.state = n["state"]
        self.earth = n.get("earth_return_ohms")
        self.loose = n.get("ohms", 0.0) if self.state == "loose" else 0.0
        self.hot_solid = abs(self.hot_z) < SOLID_OHMS
        path = self.neu_z + self.loose
        self.neutral_solid = self.state != "open" and abs(path) < SOLID_OHMS
        self.kv_last = {}
        if self.hot_solid and "transformer" in job:
            raise ValueError("a transformer with solid service hots is not generated")

    # -- names of nodes --------------------------------------------------------------------
    def hot(self, leg):
        k = int(leg[1])
        return f"S.{k}" if self.hot_solid else f"PNL.{k}"

    def bar(self):
        return "S.0" if self.neutral_solid else "PNL.4"

    def ends(self, connect):
        a, b = connect.split("-")
        if b == "N":
            return self.hot(a), self.bar()
        a, b = sorted([a, b])          # the engine orients an L-L load from the lower leg
        return self.hot(a), self.hot(b)

    # -- source and service ----------------------------------------------------------------
    def source(self):
        sysk, v = self.system["kind"], self.v
        tx = self.job.get("transformer")
        name = f"case{self.index}"
        cmd("clear")
        cmd("set defaultbasefrequency=60")
        eps = fmt(STIFF_EPS)
        stiff = f"pu=1 R1={eps} X1={eps} R0={eps} X0={eps}"
        if tx is None:
            angles = {"L1": 0, "L2": 180} if sysk == "split-phase" else {"L1": 0, "L2": -120, "L3": 120}
            for k, leg in enumerate(self.legs):
                head = f"new circuit.{name}" if k == 0 else f"new vsource.src{leg}"
                cmd(f"{head} phases=1 basekv={fmt(v / 1000)} bus1=S.{leg[1]} angle={angles[leg]} {stiff}")
            return
        eps = fmt(PRIMARY_EPS)
        prim = f"pu=1 R1={eps} X1={eps} R0={eps} X0={eps}"
        _, pct_r, pct_x = transformer_ohms(tx, self.system)
        kva = fmt(tx["kva"])
        common = "%imag=0 %noloadloss=0 ppm_antifloat=0"
        if sysk == "split-phase":
            # Kersting's center-tapped model as a 3-winding transformer (README.md: derivation).
            cmd(f"new circuit.{name} phases=1 basekv={fmt(tx['primary_v'] / 1000)} bus1=P.1 angle=0 {prim}")
            cmd(f"new transformer.tx phases=1 windings=3 buses=[P.1.0 S.1.0 S.0.2] "
                f"conns=[wye wye wye] kvs=[{fmt(tx['primary_v'] / 1000)} {fmt(v / 1000)} {fmt(v / 1000)}] "
                f"kvas=[{kva} {kva} {kva}] %Rs=[{fmt(0.5 * pct_r)} {fmt(pct_r)} {fmt(pct_r)}] "
                f"XHL={fmt(1.2 * pct_x)} XHT={fmt(1.2 * pct_x)} XLT={fmt(0.8 * pct_x)} {common}")
        else:
            # A delta-wye unit on an infinite primary: each secondary phase sees its own leakage
            # impedance. ANSI delta-wye puts the secondary 30 degrees behind the primary, so the
            # primary is set 30 degrees ahead to keep L1 at 0 degrees as in the engine.
            cmd(f"new circuit.{name} phases=3 basekv={fmt(tx['primary_v'] / 1000)} bus1=P angle=30 {prim}")
            cmd(f"new transformer.tx phases=3 windings=2 buses=[P.1.2.3 S.1.2.3.0] conns=[delta wye] "
                f"kvs=[{fmt(tx['primary_v'] / 1000)} {fmt(math.sqrt(3) * v / 1000)}] kvas=[{kva} {kva}] "
                f"%Rs=[{fmt(pct_r / 2)} {fmt(pct_r / 2)}] XHL={fmt(pct_x)} {common}")

    def service(self, fault_study=False):
        """The service conductors. For a fault study (the engine's figures): the neutral
        conductor sound (whatever the job's state) and no earth path. (A 2-phase wye reports no
        three-phase figure, so its service keeps its two hots.)"""
        legs = self.legs
        if not self.hot_solid:
            for leg in legs:
                k = leg[1]
                cmd(f"new reactor.hot{k} phases=1 bus1=S.{k} bus2=PNL.{k} "
                    f"R={fmt(self.hot_z.real)} X={fmt(self.hot_z.imag)}")
        if fault_study:
            cmd(f"new reactor.nc phases=1 bus1=PNL.4 bus2=S.0 R={fmt(self.neu_z.real)} X={fmt(self.neu_z.imag)}")
            return
        if self.state != "open" and not self.neutral_solid:
            z = self.neu_z + self.loose
            cmd(f"new reactor.nc phases=1 bus1=PNL.4 bus2=S.0 R={fmt(z.real)} X={fmt(z.imag)}")
        if self.earth is not None and not self.neutral_solid:
            cmd(f"new reactor.earth phases=1 bus1=PNL.4 bus2=S.0 R={fmt(self.earth)} X=0")

    def numerics(self):
        cmd("set tolerance=1e-13")
        cmd("set maxiterations=1000")

    # -- the loads ---------------------------------------------------------------------------
    def place(self, k, load):
        """The two nodes the load element sits between, adding its branch conductors (the loop:
        one conductor out, one back, each of the one-way branch impedance)."""
        a, b = self.ends(load["connect"])
        br = load.get("branch")
        if not br:
            return a, b
        r, x = fmt(br.get("r_ohm", 0)), fmt(br.get("x_ohm", 0))
        cmd(f"new reactor.out{k} phases=1 bus1={a} bus2=LD{k}.1 R={r} X={x}")
        cmd(f"new reactor.ret{k} phases=1 bus1=LD{k}.2 bus2={b} R={r} X={x}")
        return f"LD{k}.1", f"LD{k}.2"

    def build(self, electronic_as="load", norton=None):
        """The whole network. electronic_as: "load" = OpenDSS Load (constant P, Q) with its
        harmonic Spectrum; "norton" = at a harmonic frequency, the engine's Norton admittance
        from `norton` (k -> (G, B)) as plain R and L elements, the current sources added later."""
        self.source()
        self.service()
        self.elements = {}
        self.terminals = {}
        self.ends_of_loads = {}
        for k, load in enumerate(self.job["loads"]):
            self.ends_of_loads[k] = self.ends(load["connect"])
            a, b = self.place(k, load)
            self.terminals[k] = (a, b)
            if load["model"] in ("resistive", "impedance"):
                y, _ = load_admittance(load, self.system)
                z = 1 / y
                cmd(f"new reactor.ld{k} phases=1 bus1={a} bus2={b} R={fmt(z.real)} X={fmt(z.imag)}")
                self.elements[k] = f"reactor.ld{k}"
            elif load["model"] == "electronic" and electronic_as == "load":
                bus_a, na = a.split(".")
                bus_b, nb = b.split(".")
                if bus_a != bus_b and nb != "0":
                    raise ValueError("an electronic load must sit on one bus")
                _, vr = load_admittance(load, self.system)
                # Spectrum: fraction of the fundamental current at each order. OpenDSS puts the
                # injection at h x (angle of I1) + the spectrum angle; the engine at
                # h x (angle of V_t). For a constant-power load V_t leads I1 by acos(pf), so the
                # spectrum angle h x acos(pf) makes them the same (0 at power factor 1).
                phi = math.degrees(math.acos(min(1.0, load.get("power_factor", 1.0))))
                hs = [1] + [h for h, _ in load["harmonics"]]
                mags = [100.0] + [100.0 * f for _, f in load["harmonics"]]
                angs = [0.0] + [h * phi for h, _ in load["harmonics"]]
                cmd(f"new spectrum.sp{k} numharm={len(hs)} harmonic=[{' '.join(map(str, hs))}] "
                    f"%mag=[{' '.join(map(fmt, mags))}] angle=[{' '.join(map(fmt, angs))}]")
                cmd(f"new load.el{k} phases=1 conn=delta bus1={bus_a}.{na}.{nb if bus_a == bus_b else 0} "
                    f"kv={fmt(vr / 1000)} kw={fmt(load['watts'] / 1000)} pf={fmt(load.get('power_factor', 1.0))} "
                    f"model=1 vminpu=0.01 vlowpu=0.005 vmaxpu=100 %seriesrl=0 spectrum=sp{k}")
                self.elements[k] = f"load.el{k}"
            elif load["model"] == "electronic":
                g, bsus = norton[k]
                cmd(f"new reactor.ng{k} phases=1 bus1={a} bus2={b} R={fmt(1 / g)} X=0")
                if bsus > 1e-12 * g:
                    # The susceptance at the fundamental as an inductor: B/h at order h.
                    cmd(f"new reactor.nl{k} phases=1 bus1={a} bus2={b} R=0 X={fmt(1 / bsus)}")
                self.elements[k] = None
            else:
                raise ValueError(f"model {load['model']} is not cross-checked")
        self.numerics()

    def solve(self):
        cmd("solve")
        if not circuit().Solution.Converged:
            raise RuntimeError(f"OpenDSS did not converge on case {self.index}")

    def set_electronic_kv(self):
        """Sets each electronic Load's kV to its own terminal voltage and re-solves, until it
        stands still: OpenDSS's harmonic Norton admittance is P/kV^2 (its rated point), the
        engine's is the admittance at the operating point; at constant power the fundamental
        solution does not depend on kV."""
        for _ in range(8):
            worst = 0.0
            for k, el in self.elements.items():
                if el and el.startswith("load."):
                    vt = self.load_voltage(k)
                    cmd(f"{el}.kv={fmt(abs(vt) / 1000)}")
                    worst = max(worst, abs(abs(vt) / 1000 / self.kv_last.get(k, 1e300) - 1))
                    self.kv_last[k] = abs(vt) / 1000
            self.solve()
            if worst < 1e-15:
                break

    # -- results ------------------------------------------------------------------------------
    def load_voltage(self, k):
        a, b = self.terminals[k]
        return self.voltage(a) - self.voltage(b)

    def voltage(self, node):
        bus, n = node.split(".")
        return 0j if n == "0" else node_voltage(bus, int(n))

    def load_current(self, k):
        return element_currents(self.elements[k])[0]

    def leg_current(self, leg):
        if self.hot_solid:
            # No hot conductor to read: the current into the hot bar's loads (Kirchhoff). The
            # stiff Vsource's own current is (V - E)/Z with Z = 1e-10 ohm, which cancels badly.
            node, total = self.hot(leg), 0j
            for k, (a, b) in self.ends_of_loads.items():
                i = self.load_current(k)
                total += i if a == node else -i if b == node else 0
            return total
        return element_currents(f"reactor.hot{leg[1]}")[0]

    def neutral_current(self):
        if self.neutral_solid:
            raise ValueError("a solid neutral with loads is not generated")
        if self.state == "open":
            return 0j
        return element_currents("reactor.nc")[0]

    def earth_current(self):
        if self.earth is None or self.neutral_solid:
            return 0j
        return element_currents("reactor.earth")[0]

    def bar_voltage(self):
        return self.voltage(self.bar())


# ---------------------------------------------------------------------------------------------
# Comparison bookkeeping
# ---------------------------------------------------------------------------------------------

class Group:
    """The comparisons of one kind (fundamental, faults, ...) over all cases."""

    def __init__(self, title):
        self.title = title
        self.cases = 0
        self.values = 0
        self.worst = (0.0, "")
        self.failures = []
        self.failed_cases = set()

    def check(self, case, what, engine, opendss, scale):
        denom = max(abs(engine), FLOOR * scale)
        if denom == 0.0:
            rel = 0.0 if opendss == 0.0 else math.inf
        else:
            rel = abs(engine - opendss) / denom
        self.values += 1
        where = f"case {case} {what}"
        if rel > self.worst[0] or self.values == 1:
            self.worst = (rel, where)
        if not rel <= TOLERANCE:
            self.failures.append(f"{self.title}: {where}: engine {engine!r}, OpenDSS {opendss!r}, "
                                 f"relative difference {rel:.3g} > {TOLERANCE:g}")
            self.failed_cases.add(case)


def check_fundamental(group, index, job, report, model):
    v_scale = job["system"]["volts_to_neutral"]
    legs = {leg: abs(model.leg_current(leg)) for leg in model.legs}
    # The current scale: the largest leg current, or the loads' rated current when every leg
    # carries next to nothing (an open neutral with all the loads on one leg).
    rated = sum(l["watts"] / l.get("power_factor", 1.0) / load_admittance(l, job["system"])[1]
                for l in job["loads"])
    i_scale = max([report["legs"][leg]["fundamental_a"] for leg in model.legs] + [rated])
    for k, (lj, lr) in enumerate(zip(job["loads"], report["loads"])):
        group.check(index, f"loads[{k}].voltage_v", lr["voltage_v"], abs(model.load_voltage(k)), v_scale)
    for leg in model.legs:
        group.check(index, f"legs.{leg}.fundamental_a", report["legs"][leg]["fundamental_a"], legs[leg], i_scale)
    group.check(index, "neutral_fundamental_a", report["neutral_fundamental_a"],
                abs(model.neutral_current()), i_scale)
    group.check(index, "earth_fundamental_a", report["earth_fundamental_a"], abs(model.earth_current()), i_scale)
    shift = report["neutral"].get("panel_neutral_shift_v")
    if shift is not None:
        group.check(index, "neutral.panel_neutral_shift_v", shift, abs(model.bar_voltage()), v_scale)
    group.cases += 1


def fault_current(model, at, kind):
    """Builds the source (and, at the panel, the service as the engine's fault figures take it)
    with a Fault element of FAULT_R ohms, and returns the bolted fault current |I|.

    A Fault of 1e-12 ohm leaves the nodal matrix so ill-conditioned that OpenDSS's answer moves
    by a few 1e-6; instead the Fault is 1e-6 ohm and its resistance is taken out exactly: the
    fault is a one-port, E = (Z_th + R_f)·I with E the open-circuit voltage across it (solved with
    the Fault disabled), so the bolted current is E/Z_th = I/(1 - R_f·I/E). A three-phase fault
    to its own star point is balanced, so the same holds phase by phase (the star point at 0 V)."""
    model.source()
    if at == "service":
        model.service(fault_study=True)
        hot = lambda leg: f"PNL.{leg}"
        n = "PNL.4"
    else:
        hot = lambda leg: f"S.{leg}"
        n = "S.0"
    r = fmt(FAULT_R)
    if kind == "line_to_line_a":
        a, b = hot(1), hot(2)
        cmd(f"new fault.f phases=1 bus1={a} bus2={b} r={r}")
    elif kind == "line_to_neutral_a":
        a, b = hot(1), n
        cmd(f"new fault.f phases=1 bus1={a} bus2={b} r={r}")
    else:  # three phases together, to a star point of their own
        bus = hot(1).split(".")[0]
        a, b = hot(1), "S.0"
        cmd(f"new fault.f phases=3 bus1={bus}.1.2.3 bus2={bus}.7.7.7 r={r}")
    model.numerics()
    cmd("fault.f.enabled=no")
    model.solve()
    e = model.voltage(a) - model.voltage(b)
    cmd("fault.f.enabled=yes")
    model.solve()
    i = element_currents("fault.f")[0]
    return abs(i / (1 - FAULT_R * i / e))


def check_faults(group, index, job, report, model):
    pairs = [("terminals", report["transformer"]["fault_at_terminals"]),
             ("service", report["fault_at_service"])]
    for at, figures in pairs:
        for kind, value in figures.items():
            got = fault_current(model, at, kind)
            name = "transformer.fault_at_terminals" if at == "terminals" else "fault_at_service"
            group.check(index, f"{name}.{kind}", value, got, value)
    group.cases += 1


def orders_of(job):
    return sorted({h for l in job["loads"] if l["model"] == "electronic"
                   for h, f in l["harmonics"] if f > 0})


def check_harmonics_mode(group, index, job, report, model):
    """OpenDSS's own harmonic mode, one order at a time from the saved fundamental solution."""
    cmd("set mode=harmonics")
    rows = {row["order"]: row for row in report["neutral_harmonics"]}
    results = compare_harmonics(group, index, job, rows, model,
                                lambda h: (cmd(f"set harmonics=[{h}]"), model.solve()))
    group.cases += 1
    return results


def compare_harmonics(group, index, job, rows, model, solve_at):
    """Solves each harmonic order with `solve_at` and compares the report's neutral_harmonics.
    Returns {order: (leg currents, neutral current, earth current, bar voltage)} (magnitudes)."""
    results = {}
    for h in orders_of(job):
        solve_at(h)
        results[h] = ({leg: abs(model.leg_current(leg)) for leg in model.legs},
                      abs(model.neutral_current()), abs(model.earth_current()), abs(model.bar_voltage()))
    if sorted(rows) != sorted(results):
        group.failures.append(f"{group.title}: case {index}: orders {sorted(rows)} in the report, "
                              f"{sorted(results)} expected")
        group.failed_cases.add(index)
        return results
    i_scale = max([r["current_a"] for r in rows.values()] + [r["earth_current_a"] for r in rows.values()])
    v_scale = max(r["volts"] for r in rows.values())
    for h, (_, i_n, i_e, v_n) in results.items():
        row = rows[h]
        group.check(index, f"neutral_harmonics[h={h}].current_a", row["current_a"], i_n, i_scale)
        group.check(index, f"neutral_harmonics[h={h}].earth_current_a", row["earth_current_a"], i_e, i_scale)
        group.check(index, f"neutral_harmonics[h={h}].volts", row["volts"], v_n, v_scale)
    return results


def check_rms(group, index, job, report, fundamental, results):
    """The report's totals with harmonics, sqrt(|I1|^2 + sum |Ih|^2): each leg's current_a,
    neutral_current_a, earth_current_a, and neutral_harmonic_v (the bar's harmonic voltages)."""
    legs, i_n, i_e = fundamental
    rss = lambda first, rest: math.sqrt(first ** 2 + sum(x * x for x in rest))
    i_scale = max(report["legs"][leg]["current_a"] for leg in legs)
    for leg in legs:
        group.check(index, f"legs.{leg}.current_a", report["legs"][leg]["current_a"],
                    rss(legs[leg], [r[0][leg] for r in results.values()]), i_scale)
    group.check(index, "neutral_current_a", report["neutral_current_a"],
                rss(i_n, [r[1] for r in results.values()]), i_scale)
    group.check(index, "earth_current_a", report["earth_current_a"],
                rss(i_e, [r[2] for r in results.values()]), i_scale)
    if report.get("neutral_harmonic_v") is not None:
        v = rss(0.0, [r[3] for r in results.values()])
        group.check(index, "neutral_harmonic_v", report["neutral_harmonic_v"], v,
                    max(v, report["neutral_harmonic_v"]))


def check_harmonics_isource(group, index, job, report, fundamental):
    """The engine's Norton model written out in plain OpenDSS elements: each electronic load's
    fundamental admittance as R in parallel with L, and an Isource of fraction x |I1| at
    h x (angle of V_t), solved at each harmonic frequency (snapshot solution at that frequency:
    the Vsources are zero there, every reactance scales with frequency, resistances do not)."""
    norton, sources = {}, {}
    for k, load in enumerate(job["loads"]):
        if load["model"] != "electronic":
            continue
        i1, vt = fundamental[k]
        y = i1 / vt
        norton[k] = (y.real, -y.imag)
        sources[k] = [(h, f * abs(i1), math.degrees(h * cmath.phase(vt))) for h, f in load["harmonics"]]
    model = Model(job, index)
    model.build(electronic_as="norton", norton=norton)
    for k, srcs in sources.items():
        a, b = model.terminals[k]
        for h, amps, ang in srcs:
            # Isource drives its current into bus1 and takes it from bus2: from the hot terminal
            # into the neutral one, like the engine's source, means bus1 = the neutral terminal.
            cmd(f"new isource.e{k}h{h} phases=1 bus1={b} bus2={a} amps={fmt(amps)} angle={fmt(ang)} "
                f"frequency={fmt(60 * h)}")
    rows = {row["order"]: row for row in report["neutral_harmonics"]}

    def solve_at(h):
        cmd(f"set frequency={fmt(60 * h)}")
        cmd("solve mode=direct")

    compare_harmonics(group, index, job, rows, model, solve_at)
    group.cases += 1


# ---------------------------------------------------------------------------------------------
# The sweep timing
# ---------------------------------------------------------------------------------------------

def sweep(job, report_loose_points, workdir):
    """Re-solves one circuit at 500 log-spaced loose-neutral resistances 0.01..1000 ohm, changing
    only the neutral path's resistance. Returns (seconds, spot checks against the engine)."""
    model = Model(job, 999)
    model.build()
    model.solve()
    ck = circuit()
    base_r = model.neu_z.real
    points = [10 ** (-2 + 5 * i / 499) for i in range(500)]
    voltages = []
    t0 = time.perf_counter()
    for ohms in points:
        ck.Reactors.Name = "nc"
        ck.Reactors.R = base_r + ohms
        ck.Solution.Solve()
        voltages.append([abs(model.load_voltage(k)) for k in range(len(job["loads"]))])
    seconds = time.perf_counter() - t0
    if not ck.Solution.Converged:
        raise RuntimeError("the sweep's last solve did not converge")
    spots = []
    for i in report_loose_points:
        j = dict(job, neutral=dict(job["neutral"], state="loose", ohms=points[i]))
        rep = run_engine(j, workdir, 900 + i)
        spots.append((i, [l["voltage_v"] for l in rep["loads"]], voltages[i]))
    return seconds, spots


def engine_sweep_seconds(job, workdir):
    path = Path(workdir) / "sweep.json"
    path.write_text(json.dumps(job))
    t0 = time.perf_counter()
    proc = subprocess.run([str(tapline_path()), "sweep", str(path), "--points", "500"],
                          capture_output=True, text=True)
    seconds = time.perf_counter() - t0
    return seconds if proc.returncode == 0 else None


# ---------------------------------------------------------------------------------------------

def coverage(jobs):
    """One line saying what the networks cover."""
    count = lambda pred: sum(1 for j in jobs if pred(j))
    kinds = []
    for label, pred in [("split-phase", lambda j: j["system"]["kind"] == "split-phase"),
                        ("3-phase wye", lambda j: j["system"].get("phases") == 3),
                        ("2-phase wye", lambda j: j["system"].get("phases") == 2)]:
        kinds.append(f"{count(pred)} {label} ({count(lambda j: pred(j) and 'transformer' in j)} with a transformer)")
    st = lambda j: j["neutral"]["state"]
    earth = lambda j: j["neutral"].get("earth_return_ohms") is not None
    states = [f"{count(lambda j, s=s: st(j) == s)} {s} ({count(lambda j, s=s: st(j) == s and earth(j))} with an earth path)"
              for s in ["intact", "loose", "open"]]
    loads = [l for j in jobs for l in j["loads"]]
    el = [l for l in loads if l["model"] == "electronic"]
    return (f"networks: {', '.join(kinds)}; neutral {', '.join(states)}; {len(loads)} loads, "
            f"{sum(1 for l in loads if not l['connect'].endswith('-N'))} line to line, "
            f"{sum(1 for l in loads if 'branch' in l)} behind a branch circuit, {len(el)} electronic "
            f"({sum(1 for l in el if l.get('power_factor', 1.0) < 1.0)} at power factor below 1)")


def main():
    try:
        run()
    except (RuntimeError, ValueError, FileNotFoundError, PermissionError) as e:
        print(f"crosscheck: could not run: {e}")
        print("0 passed, 1 failed")
        sys.exit(2)


def run():
    t_start = time.perf_counter()
    exe = tapline_path()
    if not exe.exists():
        sys.exit(f"crosscheck: no engine binary at {exe} (build it, or set TAPLINE)")
    rng = random.Random(SEED)
    jobs = fundamental_jobs(rng)
    fund = Group("fundamental, constant-impedance loads")
    fund_p = Group("fundamental, with constant-power electronic loads")
    faults = Group("faults")
    harm = Group("harmonics, OpenDSS harmonic mode (Load + Spectrum)")
    harm_i = Group("harmonics, Isource at each order")
    sweep_group = Group("sweep spot checks")
    hand = None
    with tempfile.TemporaryDirectory(prefix="tapline-opendss-") as workdir:
        # OpenDSS writes files of its own (the harmonic mode's saved fundamental voltages) into
        # its data path, which is the working directory unless told otherwise.
        dss_engine.DataPath = workdir
        index = 0
        for job in jobs:
            report = run_engine(job, workdir, index)
            model = Model(job, index)
            model.build()
            model.solve()
            check_fundamental(fund, index, job, report, model)
            if index == 0:
                hand = ([l["voltage_v"] for l in report["loads"]],
                        [abs(model.load_voltage(k)) for k in range(2)])
            if report.get("transformer"):
                check_faults(faults, index, job, report, model)
            index += 1
        n_harm, attempts = 0, 0
        while n_harm < N_HARMONIC:
            attempts += 1
            if attempts > 10 * N_HARMONIC:
                sys.exit("crosscheck: could not draw enough harmonic cases with every supply running")
            job = harmonic_job(rng, n_harm)
            report = run_engine(job, workdir, index)
            # Keep the electronic loads inside their input range (constant power) at the draw.
            if any(l["model"] == "electronic" and r["state"] != "running"
                   for l, r in zip(job["loads"], report["loads"])):
                continue
            model = Model(job, index)
            model.build()
            model.solve()
            model.set_electronic_kv()
            check_fundamental(fund_p, index, job, report, model)
            fundamental = {k: (model.load_current(k), model.load_voltage(k))
                           for k, l in enumerate(job["loads"]) if l["model"] == "electronic"}
            totals = ({leg: abs(model.leg_current(leg)) for leg in model.legs},
                      abs(model.neutral_current()), abs(model.earth_current()))
            results = check_harmonics_mode(harm, index, job, report, model)
            check_rms(harm, index, job, report, totals, results)
            check_harmonics_isource(harm_i, index, job, report, fundamental)
            if report.get("transformer"):
                check_faults(faults, index, job, report, Model(job, index))
            jobs.append(job)
            index += 1
            n_harm += 1
        sweep_job = jobs[1]
        sweep_s, spots = sweep(sweep_job, [0, 137, 250, 380, 499], workdir)
        for i, eng, ods in spots:
            for k, (a, b) in enumerate(zip(eng, ods)):
                sweep_group.check(1, f"sweep point {i} loads[{k}].voltage_v", a, b,
                                  sweep_job["system"]["volts_to_neutral"])
        sweep_group.cases = 1
        engine_s = engine_sweep_seconds(sweep_job, workdir)

    groups = [fund, fund_p, faults, harm, harm_i, sweep_group]
    print(coverage(jobs))
    worst = max(g.worst[0] for g in groups)
    failures = [f for g in groups for f in g.failures]
    print(f"hand check (stiff 120/240 V, 1500 W on L1, 300 W on L2, open neutral, no earth): "
          f"engine {hand[0][0]:.9f} V and {hand[0][1]:.9f} V, "
          f"OpenDSS {hand[1][0]:.9f} V and {hand[1][1]:.9f} V (by hand: 40 V and 200 V)")
    hand_ok = all(abs(a - b) < 1e-6 for a, b in zip(hand[0] + hand[1], [40, 200, 40, 200]))
    for g in groups:
        print(f"  {g.title}: {g.cases} networks, {g.values} values, worst relative difference "
              f"{g.worst[0]:.2e} ({g.worst[1]})")
    print(f"sweep: {len(range(500))} log-spaced neutral resistances 0.01..1000 ohm, one OpenDSS circuit "
          f"re-solved in process: {sweep_s:.3f} s ({1000 * sweep_s / 500:.3f} ms per point)"
          + (f"; for scale, `tapline sweep --points 500` (its own points, 0 to open, debug build, "
             f"process start included) took {engine_s:.3f} s" if engine_s is not None else ""))
    elapsed = time.perf_counter() - t_start
    passed = sum(g.cases - len(g.failed_cases) for g in groups) + (1 if hand_ok else 0)
    failed = sum(len(g.failed_cases) for g in groups) + (0 if hand_ok else 1)
    if failures or not hand_ok:
        for f in failures:
            print("DISAGREEMENT " + f)
        if not hand_ok:
            print("DISAGREEMENT hand check: the loads do not get 40 V and 200 V")
        print(f"crosscheck: the engine and OpenDSS disagree (tolerance {TOLERANCE:g}); runtime {elapsed:.1f} s")
        print(f"{passed} passed, {failed} failed")
        sys.exit(1)
    print(f"{len(jobs)} networks agree with OpenDSS; worst relative difference {worst:.2e}")
    print(f"runtime {elapsed:.1f} s")
    print(f"{passed} passed, 0 failed")


if __name__ == "__main__":
    main()
