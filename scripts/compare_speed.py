#!/usr/bin/env python3
"""Side-by-side speed of dwell against SciPy on the example houses, at measured accuracy.

Usage:
    python3 scripts/compare_speed.py [--dwell PATH] [--ivp-days N] [--repeats R] [MODEL.json ...]

For each model (default: every ``zones-examples/*.json``):

1. ``dwell network MODEL --json`` gives the state space ``x' = A x + B u`` and each input's
   hold (``linear``: first-order hold, temperatures; ``step``: zero-order hold, heat flows).
2. ``dwell simulate MODEL --control free --initial 15 --out DIR`` is run ``R`` times as a
   whole process (parse, weather, sun, discretisation, a year of hourly steps, writing the
   CSV and JSON files); the median wall time is reported. Its ``inputs.csv`` holds the
   inputs as applied, and ``hourly.csv`` the zone air temperatures.
3. SciPy 1.18.1 ``signal.cont2discrete`` ('zoh' for the step inputs, 'foh' for the linear
   ones; its FOH state is shifted, so the outputs are compared, by superposition) and a NumPy
   loop over the same year: time of setup and of the loop, and the largest difference from
   dwell's hourly zone temperatures (which are printed to 1e-4 K or better in the CSV).
4. SciPy ``integrate.solve_ivp`` (Radau, with the Jacobian ``A`` given; restarted every hour
   at the input breakpoints, inputs interpolated as dwell holds them) over the first
   ``--ivp-days`` days only (a year takes minutes), at rtol = atol = 1e-6 and 1e-10; its
   time is scaled to a year (×8760/hours) and its error measured against the exact
   discrete solution of step 3.

Prints one table with the ratios ``solve_ivp year / dwell process`` and
``NumPy loop / dwell process``. The machine's load changes the times; the ratios are what
to quote (docs/performance.md).
"""

from __future__ import annotations

import csv
import json
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import scipy
from scipy.integrate import solve_ivp
from scipy.signal import cont2discrete

ROOT = Path(__file__).resolve().parent.parent
STEP_S = 3600.0
INITIAL_C = 15.0


def run_dwell(dwell: str, model: Path, repeats: int) -> tuple[float, Path, list[float]]:
    """Median wall time (s) of the whole `dwell simulate` process, and its output folder."""
    out = Path(tempfile.mkdtemp(prefix="dwell-speed-"))
    times = []
    for r in range(repeats):
        target = out / f"run{r}"
        t0 = time.perf_counter()
        subprocess.run(
            [dwell, "simulate", str(model), "--control", "free", "--initial", str(INITIAL_C),
             "--out", str(target)],
            check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
        )
        times.append(time.perf_counter() - t0)
    return statistics.median(times), out / "run0", times


def read_csv(path: Path) -> tuple[list[str], np.ndarray]:
    with path.open(newline="") as f:
        rows = list(csv.reader(f))
    header = rows[0]
    data = np.array([[float(v) if v not in ("", "NaN", "nan") else np.nan for v in r[1:]]
                     for r in rows[1:]])
    return header[1:], data


def discrete_loop(a, b, hold, u, x0, zones):
    """cont2discrete + NumPy loop; returns (setup s, loop s, zone temperatures (°C) per stamp)."""
    n = a.shape[0]
    lin = [j for j, h in enumerate(hold) if h == "linear"]
    stp = [j for j, h in enumerate(hold) if h != "linear"]
    eye = np.eye(n)
    t0 = time.perf_counter()
    ad, bz, *_ = cont2discrete((a, b[:, stp], eye, np.zeros((n, len(stp)))), STEP_S, method="zoh")
    adf, bf, cf, df, _ = cont2discrete((a, b[:, lin], eye, np.zeros((n, len(lin)))), STEP_S,
                                       method="foh")
    t1 = time.perf_counter()
    ul, us = u[:, lin], u[:, stp]
    hours = u.shape[0] - 1
    xz = x0.copy()
    xi = -df @ ul[0]  # FOH part starts at 0: x_foh = cf ξ + df u, cf = I
    out = np.empty((hours + 1, len(zones)))
    out[0] = x0[zones]
    for k in range(hours):
        xz = ad @ xz + bz @ us[k]
        xi = adf @ xi + bf @ ul[k]
        out[k + 1] = (xz + cf @ xi + df @ ul[k + 1])[zones]
    t2 = time.perf_counter()
    return t1 - t0, t2 - t1, out


def ivp(a, b, hold, u, x0, zones, hours, rtol):
    """solve_ivp (Radau) hour by hour; returns (s, zone temperatures (°C) per stamp)."""
    lin = np.array([h == "linear" for h in hold])
    out = np.empty((hours + 1, len(zones)))
    out[0] = x0[zones]
    x = x0.copy()
    t0 = time.perf_counter()
    for k in range(hours):
        uk, du = u[k], np.where(lin, u[k + 1] - u[k], 0.0)

        def rhs(t, y, uk=uk, du=du):
            return a @ y + b @ (uk + du * (t / STEP_S))

        sol = solve_ivp(rhs, (0.0, STEP_S), x, method="Radau", rtol=rtol, atol=rtol,
                        jac=a)
        x = sol.y[:, -1]
        out[k + 1] = x[zones]
    return time.perf_counter() - t0, out


def main(argv: list[str]) -> int:
    dwell = str(ROOT / "target-perf" / "release" / "dwell")
    ivp_days, repeats, models = 7, 5, []
    it = iter(argv)
    for arg in it:
        if arg == "--dwell":
            dwell = next(it)
        elif arg == "--ivp-days":
            ivp_days = int(next(it))
        elif arg == "--repeats":
            repeats = int(next(it))
        else:
            models.append(Path(arg))
    if not models:
        models = sorted((ROOT / "zones-examples").glob("*.json"))
    if not Path(dwell).exists():
        print(f"no dwell binary at {dwell}: build it with "
              "`CARGO_TARGET_DIR=target-perf cargo build --release` or pass --dwell PATH",
              file=sys.stderr)
        return 2
    print(f"numpy {np.__version__}, scipy {scipy.__version__}; dwell {dwell}")
    print(f"solve_ivp over the first {ivp_days} days, scaled to a year; dwell: median of "
          f"{repeats} whole-process runs (--control free --initial {INITIAL_C})")
    rows = []
    for model in models:
        ss = json.loads(subprocess.run([dwell, "network", str(model), "--json"], check=True,
                                       capture_output=True, text=True).stdout)
        a, b, hold = np.array(ss["a"]), np.array(ss["b"]), ss["input_hold"]
        names = list(ss["zone_states"])
        zones = [ss["zone_states"][z] for z in names]
        n = a.shape[0]
        t_dwell, out, all_t = run_dwell(dwell, model, repeats)
        in_cols, u = read_csv(out / "inputs.csv")
        assert in_cols == ss["inputs"], f"{model}: inputs.csv columns differ from the network"
        h_cols, hourly = read_csv(out / "hourly.csv")
        dwell_z = np.column_stack([hourly[:, h_cols.index(f"{z}_c")] for z in names])
        x0 = np.full(n, INITIAL_C)
        hours = u.shape[0] - 1
        t_c2d, t_loop, exact = discrete_loop(a, b, hold, u, x0, zones)
        err_loop = np.nanmax(np.abs(exact - dwell_z))
        k = min(hours, ivp_days * 24)
        ivp_res = []
        for rtol in (1e-6, 1e-10):
            t_ivp, z_ivp = ivp(a, b, hold, u, x0, zones, k, rtol)
            ivp_res.append((rtol, t_ivp * 8760 / k, np.max(np.abs(z_ivp - exact[: k + 1]))))
        rows.append((model.stem, n, len(hold), hours, t_dwell, min(all_t), t_c2d, t_loop,
                     err_loop, ivp_res))
    print()
    print("| model | states | inputs | hours | dwell process (s) | cont2discrete (s) | NumPy loop (s) "
          "| max |NumPy − dwell| (K) | solve_ivp rtol | solve_ivp year (s, scaled) "
          "| solve_ivp error (K) | ivp / dwell | (c2d + loop) / dwell |")
    print("|---|---|---|---|---|---|---|---|---|---|---|---|---|")
    for (name, n, m, hours, t_dwell, t_min, t_c2d, t_loop, err_loop, ivp_res) in rows:
        for rtol, t_ivp, err_ivp in ivp_res:
            print(f"| {name} | {n} | {m} | {hours} | {t_dwell:.3f} | {t_c2d:.4f} | {t_loop:.3f} "
                  f"| {err_loop:.1e} | {rtol:.0e} | {t_ivp:.1f} | {err_ivp:.1e} "
                  f"| {t_ivp / t_dwell:.0f}× | {(t_c2d + t_loop) / t_dwell:.1f}× |")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
