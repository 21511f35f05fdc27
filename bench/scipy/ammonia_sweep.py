#!/usr/bin/env python3
"""The 50-point sweep of the ammonia demo loop (flowsheets/ammonia-loop.yaml), scripted the way a
careful engineer writes it today with NumPy and SciPy. It is the other side of the whole-process
comparison in bench/scipy/compare.mjs; it is a benchmark, not a test, and not part of the tool.

What it computes, for the purge fraction of the loop's splitter from 0.015 to 0.04 in 50 steps:
- the makeup gas: 2400 Nm3/h (0 degC, 101.325 kPa, real-gas volume, ISO 13443) to mol/s by the
  vapour root of the SRK cubic at the reference state;
- the loop's material balance with the recycle's component flows as the unknowns, solved by
  scipy.optimize.fsolve (MINPACK hybrd), each point started from the one before (continuation);
- the converter at a fixed 22 % conversion of N2 (N2 + 3 H2 -> 2 NH3);
- the chiller as an isothermal flash at -10 degC and 145 bar: Rachford-Rice (brentq) inside
  successive substitution on the K-values, K = phi_L / phi_V from SRK fugacity coefficients,
  started from Wilson's K-values and warm-started from the last flash;
- the splitter: the purge fraction of the separator gas leaves, the rest is recycled.
The temperatures and pressures around the loop do not change its material balance here (the
heater, cooler and circulator set T and P only), so the script, like an engineer's, leaves the
energy balance out; loopclose computes it as well.

Component data: the constants loopclose uses (src/thermo/components.ts: Poling, Prausnitz and
O'Connell, The Properties of Gases and Liquids, 5th ed., Appendix A), R from CODATA 2018, and
kij = 0 for every pair, as the demo file sets no `thermo.kij`. SRK as in Soave, Chem. Eng. Sci.
27 (1972) 1197, with Omega_a and Omega_b from the critical conditions, as loopclose does.

Output: CSV on standard output, one line per point: purge fraction, purge total (mol/s), liquid
product total (mol/s), liquid NH3 (mol/s), fsolve's status flag.
"""
import sys

import numpy as np
from scipy.optimize import brentq, fsolve

R = 8.314462618  # J/(mol K), CODATA 2018
IDS = ["H2", "N2", "Ar", "CH4", "NH3"]
TC = np.array([33.19, 126.2, 150.86, 190.56, 405.65])  # K
PC = np.array([13.13, 33.98, 48.98, 45.99, 112.8]) * 1e5  # Pa
OMEGA = np.array([-0.216, 0.037, -0.002, 0.011, 0.253])
KIJ = np.zeros((5, 5))

CBRT2 = 2.0 ** (1.0 / 3.0)
OMEGA_B = (CBRT2 - 1.0) / 3.0
OMEGA_A = 1.0 / (9.0 * (CBRT2 - 1.0))
M = 0.48 + (1.574 - 0.176 * OMEGA) * OMEGA
B_I = OMEGA_B * R * TC / PC


def a_pure(T):
    alpha = (1.0 + M * (1.0 - np.sqrt(T / TC))) ** 2
    return OMEGA_A * (R * TC) ** 2 / PC * alpha


def srk_z(A, B, root):
    """Roots of Z^3 - Z^2 + (A - B - B^2) Z - A B = 0; 'vapor' the largest, 'liquid' the smallest above B."""
    z = np.roots([1.0, -1.0, A - B - B * B, -A * B])
    z = z[np.abs(z.imag) < 1e-10].real
    z = z[z > B]
    return z.max() if root == "vapor" else z.min()


def ln_phi(x, T, P, root):
    ai = a_pure(T)
    aij = np.sqrt(np.outer(ai, ai)) * (1.0 - KIJ)
    sa = aij @ x
    a = x @ sa
    b = x @ B_I
    A = a * P / (R * T) ** 2
    B = b * P / (R * T)
    Z = srk_z(A, B, root)
    return B_I / b * (Z - 1.0) - np.log(Z - B) - A / B * (2.0 * sa / a - B_I / b) * np.log(1.0 + B / Z)


def rachford_rice(z, K):
    f = lambda beta: np.sum(z * (K - 1.0) / (1.0 + beta * (K - 1.0)))
    lo = 1.0 / (1.0 - K.max()) + 1e-12
    hi = 1.0 / (1.0 - K.min()) - 1e-12
    lo, hi = max(lo, 0.0), min(hi, 1.0)
    if f(lo) <= 0.0:
        return 0.0
    if f(hi) >= 0.0:
        return 1.0
    return brentq(f, lo, hi, xtol=1e-15, rtol=1e-15)


class Flash:
    """Isothermal flash by successive substitution; remembers its last K-values."""

    def __init__(self, T, P):
        self.T, self.P = T, P
        self.K = PC / P * np.exp(5.373 * (1.0 + OMEGA) * (1.0 - TC / T))  # Wilson

    def __call__(self, flows):
        F = flows.sum()
        z = flows / F
        K = self.K
        for _ in range(500):
            beta = rachford_rice(z, K)
            x = z / (1.0 + beta * (K - 1.0))
            y = K * x
            x /= x.sum()
            y /= y.sum()
            Knew = np.exp(ln_phi(x, self.T, self.P, "liquid") - ln_phi(y, self.T, self.P, "vapor"))
            done = np.max(np.abs(np.log(Knew / K))) < 1e-12
            K = Knew
            if done:
                break
        else:
            raise RuntimeError("flash did not converge")
        self.K = K
        beta = rachford_rice(z, K)
        x = z / (1.0 + beta * (K - 1.0))
        vapor = F * beta * K * x
        return vapor, flows - vapor


def makeup_flow():
    """2400 Nm3/h at 0 degC, 101.325 kPa, real-gas volume: n = P V / (Z R T)."""
    x = np.array([0.7410, 0.2470, 0.0030, 0.0090, 0.0])
    x /= x.sum()
    T, P = 273.15, 101325.0
    ai = a_pure(T)
    a = x @ (np.sqrt(np.outer(ai, ai)) * (1.0 - KIJ)) @ x
    b = x @ B_I
    Z = srk_z(a * P / (R * T) ** 2, b * P / (R * T), "vapor")
    return x * (P * 2400.0 / 3600.0 / (Z * R * T))


def main():
    feed = makeup_flow()
    chiller = Flash(263.15, 145e5)
    NU = np.array([-3.0, -1.0, 0.0, 0.0, 2.0])

    def loop(recycle, purge):
        mixed = feed + recycle
        out = mixed + NU * 0.22 * mixed[1]
        gas, liquid = chiller(out)
        return gas, liquid, (1.0 - purge) * gas

    guess = 5.0 * feed
    print("purge_fraction,purge_mol_s,product_mol_s,product_NH3_mol_s,fsolve_ier")
    for purge in np.linspace(0.015, 0.04, 50):
        scale = np.maximum(np.abs(guess), 1e-3)
        sol, info, ier, msg = fsolve(lambda r: (loop(r * scale, purge)[2] - r * scale) / scale,
                                     guess / scale, xtol=1e-12, full_output=True)
        rec = sol * scale
        gas, liquid, _ = loop(rec, purge)
        print(f"{purge:.16g},{(purge * gas).sum():.16g},{liquid.sum():.16g},{liquid[4]:.16g},{ier}")
        guess = rec
    sys.stdout.flush()


if __name__ == "__main__":
    main()
