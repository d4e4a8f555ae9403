#!/usr/bin/env python3
"""Reference fixtures for dwell-solver, computed with SciPy.

Usage:
    python3 scripts/ref_solver.py [STATE_SPACE.json ...]
    python3 scripts/ref_solver.py --house [--no-ivp=NAME ...] HOUSE_ss.json ...
        (state spaces of example houses from `dwell network MODEL --json`, daily step inputs;
        --no-ivp=NAME skips the slow solve_ivp year for NAME_ss.json)

Each input file holds a state space ``x' = A x + B u`` with fields ``a`` (n x n, 1/s,
row-major nested lists), ``b`` (n x m) and ``input_hold`` (m entries, "linear" for
temperatures interpolated linearly between hourly samples, "step" for heat flows held over
each hour); optional ``capacitance``, ``conductance`` and ``input`` (C, K, U) let the Rust
tests run the modal route too. Without arguments the script (re)writes a synthetic 15-node
network to crates/dwell-solver/tests/reference/synthetic_ss.json and uses it.

For ``NAME_ss.json`` (or ``NAME.json``) it writes ``crates/dwell-solver/tests/reference/NAME_ref.json``:

- ``expm_ha``: scipy.linalg.expm(h A) (Al-Mohy & Higham 2009), h = 3600 s;
- ``zoh_bd``: scipy.signal.cont2discrete(method="zoh") input matrix;
- ``discrete_states``: a year of hourly steps with SciPy's discrete matrices, FOH
  (cont2discrete method="foh", which is state-shifted: x = xi + (C ms13) u, so the
  *simulated* output is compared, not B entry by entry) for the "linear" inputs and ZOH for
  the "step" inputs, superposed;
- ``ivp_states``: the same year by solve_ivp(Radau, rtol=1e-10, atol=1e-10), restarted at
  every change of the step inputs (each hour for the synthetic network, each day for the
  houses), with the linear inputs interpolated between hourly samples inside the call;
- ``inputs``: the 8761 hourly input samples (defined below), ``x0`` the initial state.

States are stored every ``SAMPLE_EVERY_H`` hours to keep the files small.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import numpy as np
import scipy
from scipy.integrate import solve_ivp
from scipy.linalg import expm
from scipy.signal import cont2discrete

ROOT = Path(__file__).resolve().parent.parent
REF_DIR = ROOT / "crates" / "dwell-solver" / "tests" / "reference"
STEP_S = 3600.0
HOURS = 8760
SAMPLE_EVERY_H = 24


def synthetic_state_space(n: int = 15, heat_inputs: int = 3, seed: int = 20240611) -> dict:
    """A random stiff RC network (time constants minutes to months), C, K, U and A, B."""
    rng = np.random.default_rng(seed)
    k = np.zeros((n, n))

    def link(i: int, j: int, g: float) -> None:
        k[i, i] += g
        k[j, j] += g
        k[i, j] -= g
        k[j, i] -= g

    for i in range(1, n):
        link(i, int(rng.integers(0, i)), float(np.exp(rng.uniform(np.log(0.5), np.log(200.0)))))
    for _ in range(n // 2):
        i, j = (int(v) for v in rng.integers(0, n, size=2))
        if i != j:
            link(i, j, float(np.exp(rng.uniform(np.log(0.5), np.log(200.0)))))
    c = np.exp(rng.uniform(np.log(1e4), np.log(5e7), size=n))
    m = 2 + heat_inputs
    u = np.zeros((n, m))
    for i in range(n):
        if i == n - 1 or rng.uniform() < 0.25:
            u[i, 0] = float(np.exp(rng.uniform(np.log(0.5), np.log(50.0))))
    u[0, 1] = 20.0
    k += np.diag(u[:, 0] + u[:, 1])
    for j in range(2, m):
        a, b = (int(v) for v in rng.integers(0, n, size=2))
        u[a, j] += 0.6
        u[b, j] += 0.4
    a_mat = -k / c[:, None]
    b_mat = u / c[:, None]
    return {
        "a": a_mat.tolist(),
        "b": b_mat.tolist(),
        "input_hold": ["linear", "linear"] + ["step"] * heat_inputs,
        "capacitance": c.tolist(),
        "conductance": k.tolist(),
        "input": u.tolist(),
    }


def input_series(hold: list[str]) -> np.ndarray:
    """Hourly samples u_0 .. u_HOURS (HOURS+1 rows).

    "linear" inputs: outdoor-like 10 + 8 sin(2 pi t/8760 h - 2) + 5 sin(2 pi t/24 h - 1) (deg C),
    each later one shifted by 3 h. "step" inputs: 400 + 300 sin(2 pi t/24 h + j) plus a
    deterministic pseudo-random +-200 W from a seeded generator (W), held over the hour.
    """
    t = np.arange(HOURS + 1, dtype=float)
    rng = np.random.default_rng(7)
    cols = []
    for j, kind in enumerate(hold):
        if kind == "linear":
            s = t - 3.0 * j
            cols.append(10.0 + 8.0 * np.sin(2 * np.pi * s / 8760.0 - 2.0) + 5.0 * np.sin(2 * np.pi * s / 24.0 - 1.0))
        else:
            cols.append(400.0 + 300.0 * np.sin(2 * np.pi * t / 24.0 + j) + rng.uniform(-200.0, 200.0, size=t.size))
    return np.column_stack(cols)


def discrete_year(a: np.ndarray, b: np.ndarray, hold: list[str], u: np.ndarray, x0: np.ndarray) -> np.ndarray:
    """Year by SciPy's exact discretisations: FOH for linear inputs, ZOH for step inputs."""
    n = a.shape[0]
    lin = [j for j, h in enumerate(hold) if h == "linear"]
    stp = [j for j, h in enumerate(hold) if h == "step"]
    eye, zero = np.eye(n), np.zeros((n, 1))
    states = np.empty((HOURS + 1, n))
    states[0] = x0
    # Free response plus ZOH part: x_{k+1} = Ad x_k + Bz u_step,k.
    ad, bz, *_ = cont2discrete((a, b[:, stp] if stp else zero, eye, 0.0), STEP_S, method="zoh")
    x = x0.copy()
    for k in range(HOURS):
        x = ad @ x + (bz @ u[k, stp] if stp else 0.0)
        states[k + 1] = x
    if lin:
        # FOH part from zero initial state; state-shifted form, output y = C xi + D u = x.
        _, bf, cf, df, _ = cont2discrete((a, b[:, lin], eye, np.zeros((n, len(lin)))), STEP_S, method="foh")
        # Zero initial state in x means xi_0 = -D u_0 (x = C xi + D u with C = I).
        xi = -df @ u[0, lin]
        for k in range(HOURS):
            xi = ad @ xi + bf @ u[k, lin]
            states[k + 1] += cf @ xi + df @ u[k + 1, lin]
    return states


def house_input_series(hold: list[str]) -> np.ndarray:
    """Hourly samples u_0 .. u_HOURS for the example houses, a closed form the Rust test
    repeats: "linear" input j: 10 + 8 sin(2 pi s/8760 - 2) + 5 sin(2 pi s/24 - 1), s = t - 3j
    (t in hours); "step" input j: 300 (1 + sin(2 pi d/7 + j)), d = floor(t/24), held over
    each day (W, or W/m2 for irradiances)."""
    t = np.arange(HOURS + 1, dtype=float)
    d = np.floor(t / 24.0)
    cols = []
    for j, kind in enumerate(hold):
        if kind == "linear":
            s = t - 3.0 * j
            cols.append(10.0 + 8.0 * np.sin(2 * np.pi * s / 8760.0 - 2.0) + 5.0 * np.sin(2 * np.pi * s / 24.0 - 1.0))
        else:
            cols.append(300.0 * (1.0 + np.sin(2 * np.pi * d / 7.0 + j)))
    return np.column_stack(cols)


def ivp_year_daily(a: np.ndarray, b: np.ndarray, hold: list[str], u: np.ndarray, x0: np.ndarray) -> np.ndarray:
    """Year by Radau, one call per day: step inputs constant over the day, linear inputs
    interpolated between the hourly samples inside the call."""
    lin = [j for j, h in enumerate(hold) if h == "linear"]
    stp = [j for j, h in enumerate(hold) if h == "step"]
    ul_all = u[:, lin]
    bl = b[:, lin]
    states = np.empty((HOURS + 1, a.shape[0]))
    states[0] = x0
    x = x0.copy()
    for day in range(HOURS // 24):
        t0 = day * 24 * STEP_S
        t1 = t0 + 24 * STEP_S
        q = b[:, stp] @ u[day * 24, stp] if stp else 0.0

        def rhs(t: float, y: np.ndarray, t0=t0, q=q, day=day) -> np.ndarray:
            s = (t - t0) / STEP_S
            i = min(max(int(s), 0), 23)
            k = day * 24 + i
            ul = ul_all[k] + (ul_all[k + 1] - ul_all[k]) * (s - i)
            return a @ y + bl @ ul + q

        sol = solve_ivp(rhs, (t0, t1), x, method="Radau", jac=a, rtol=1e-10, atol=1e-10,
                        t_eval=t0 + STEP_S * np.arange(1, 25))
        if not sol.success:
            raise RuntimeError(f"solve_ivp failed on day {day}: {sol.message}")
        states[day * 24 + 1: day * 24 + 25] = sol.y.T
        x = sol.y[:, -1]
    return states


def ivp_year(a: np.ndarray, b: np.ndarray, hold: list[str], u: np.ndarray, x0: np.ndarray) -> np.ndarray:
    """Year by Radau, one call per hour (inputs are smooth within an hour)."""
    lin = np.array([h == "linear" for h in hold])
    states = np.empty((HOURS + 1, a.shape[0]))
    states[0] = x0
    x = x0.copy()
    for k in range(HOURS):
        u0, u1 = u[k], u[k + 1]
        du = np.where(lin, u1 - u0, 0.0)

        def rhs(t: float, y: np.ndarray) -> np.ndarray:
            return a @ y + b @ (u0 + du * (t / STEP_S))

        sol = solve_ivp(rhs, (0.0, STEP_S), x, method="Radau", jac=a, rtol=1e-10, atol=1e-10)
        if not sol.success:
            raise RuntimeError(f"solve_ivp failed in hour {k}: {sol.message}")
        x = sol.y[:, -1]
        states[k + 1] = x
    return states


def reference(ss: dict, house: bool = False, with_ivp: bool = True) -> dict:
    a = np.asarray(ss["a"], dtype=float)
    b = np.asarray(ss["b"], dtype=float)
    hold = list(ss["input_hold"])
    u = house_input_series(hold) if house else input_series(hold)
    x0 = np.full(a.shape[0], 15.0)
    ad, bd, *_ = cont2discrete((a, b, np.eye(a.shape[0]), 0.0), STEP_S, method="zoh")
    disc = discrete_year(a, b, hold, u, x0)
    if house and not with_ivp:
        ivp = None
    else:
        ivp = ivp_year_daily(a, b, hold, u, x0) if house else ivp_year(a, b, hold, u, x0)
    rows = list(range(0, HOURS + 1, SAMPLE_EVERY_H))
    out = dict(ss)
    out.update(
        {
            "generator": f"scripts/ref_solver.py, scipy {scipy.__version__}, numpy {np.__version__}",
            "step_s": STEP_S,
            "expm_ha": expm(STEP_S * a).tolist(),
            "zoh_ad": ad.tolist(),
            "zoh_bd": bd.tolist(),
            "x0": x0.tolist(),
            **({"input_formula": "house_input_series"} if house else {"inputs": u.tolist()}),
            "sample_every_h": SAMPLE_EVERY_H,
            "discrete_states": disc[rows].tolist(),
            **({} if ivp is None else {
                "ivp_states": ivp[rows].tolist(),
                "ivp_vs_discrete_max_k": float(np.abs(ivp - disc).max()),
            }),
        }
    )
    return out


def main(argv: list[str]) -> int:
    REF_DIR.mkdir(parents=True, exist_ok=True)
    house = "--house" in argv
    no_ivp = [a.split("=", 1)[1] for a in argv if a.startswith("--no-ivp=")]
    argv = [a for a in argv if a != "--house" and not a.startswith("--no-ivp=")]
    paths = [Path(p) for p in argv]
    if not paths:
        synthetic = REF_DIR / "synthetic_ss.json"
        synthetic.write_text(json.dumps(synthetic_state_space()) + "\n")
        paths = [synthetic]
    for path in paths:
        ss = json.loads(path.read_text())
        name = path.stem.removesuffix("_ss")
        ref = reference(ss, house, with_ivp=name not in no_ivp)
        target = REF_DIR / f"{name}_ref.json"
        target.write_text(json.dumps(ref) + "\n")
        gap = ref.get("ivp_vs_discrete_max_k")
        print(f"{target}: " + ("no ivp" if gap is None else f"ivp vs discrete max {gap:.2e} K"))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
