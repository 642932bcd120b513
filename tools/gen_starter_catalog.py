#!/usr/bin/env python3
"""Generate the generic starter catalog: data/starter/inductors.csv and data/starter/diodes.csv.

ILLUSTRATIVE GENERIC PARTS, NOT REAL PRODUCTS. Every part below is invented from the scaling laws in
this file so that a fresh install has something to rank; a designer should import the lists of the
parts they can actually buy. Run `python3 tools/gen_starter_catalog.py` from anywhere; the output is
deterministic (no randomness: variation comes from fixed low-discrepancy sequences), so running it
twice gives byte-identical files. Python 3 standard library only.

Sources of the constants are given beside them: "domain notes" = /work/shared/domain-notes.md,
"common practice" = a rule of the trade, "from memory" = a recalled value to re-check before relying
on it, "invented" = chosen to give typical-looking catalogs (calibrated against typical datasheet
values recalled from memory).

Inductor laws (per part: family f, body L x W x H, inductance L0):
  1. Stored energy: 1/2*L0*Isat^2 = e * V_body, e = energy density of the body size, inside the
     family band [e_min, e_max] (FAMILY_DEFAULTS, same numbers as family_defaults() in
     src/parts/inductor.cpp). So Isat = sqrt(2*e*V/L0).
  2. Copper: DCR = L0 * W_f * rho20 * e / (B_sat^2 * l^2), l = V^(1/3). Derivation: L = N^2*A_L with
     A_L = B_sat^2*Ae^2/(2*E) (gapped core holding energy E at flux B_sat), DCR = rho*N^2*MLT/(k_cu*A_w),
     and Ae = g_e*l^2, A_w = g_w*l^2, MLT = g_m*l, giving W_f = 2*g_m/(g_e^2*g_w*k_cu). Within one body
     size DCR is exactly proportional to L0 (turns^2 proportional to L); across sizes DCR/L0 falls as
     1/l^2 (copper-fill law).
  3. Thermal: R_th = RTH_SCALE / sqrt(A_surface[mm^2]) K/W on the bounding box surface, and
     Irms = sqrt(dT_rated / (R_th * DCR_typ)), dT_rated = 40 K (domain notes: R_th = dT/(Irms^2*DCR)).
  4. SRF = 1/(2*pi*sqrt(L0*C_p)), C_p = CP_REF * (l/l_ref) * (L0/10uH)^CP_EXP: falls with L0.
  5. Turn limits (which values a size offers): at least 2 turns, wire no thinner than 0.05 mm.

Diode laws (per part: technology, Vrrm, If_avg, package), all forward points are computed FROM chosen
SPICE parameters IS, N, RS, EG, XTI with ngspice's diode equations so a fit is well posed:
  i = IS(T)*(exp(vd/(N*Vt)) - 1), v = vd + i*RS,
  IS(T) = IS*exp((T/Tnom - 1)*EG/(N*Vt(T)))*(T/Tnom)^(XTI/N), Tnom = 27 C (ngspice defaults).
  N and XTI are fixed per technology (the technology defaults a fitter should use); IS and 1/RS scale
  with die area (proportional to the current rating); Schottky IS from thermionic emission with a
  barrier that rises with the voltage class.
"""

import math
import os

# ----------------------------------------------------------------------------------------------
# Physical constants
RHO_CU_20 = 1.7241e-8          # ohm*m, IEC 60028 annealed copper at 20 C (domain notes)
K_BOLTZMANN = 1.380649e-23     # J/K, exact SI
Q_ELECTRON = 1.602176634e-19   # C, exact SI
TNOM = 300.15                  # K, ngspice default TNOM (27 C)
T25 = 298.15
T125 = 398.15

NOTE = "illustrative generic part - not a real product"
CURRENCY = "USD"

# ----------------------------------------------------------------------------------------------
# Family table. MUST match family_defaults() in src/parts/inductor.cpp (tests/catalog checks the
# data against that table, so drift fails the test).
# code, name: shape, Steinmetz k [W/m^3], alpha, beta, b_sat [T], core volume fraction,
# ac_factor at 100 kHz, energy-density band [J/m^3 of body volume].
FAMILY_DEFAULTS = {
    # MnZn ferrite drum: 200 mW/cm^3 at 100 kHz, 100 mT (domain notes range 100-300, from memory)
    "shielded-drum-ferrite": dict(shape="hard", k=8.0, alpha=1.4, beta=2.6, b_sat=0.30,
                                  vol_frac=0.50, ac=1.8, e_min=150.0, e_max=450.0),
    "semi-shielded-drum": dict(shape="hard", k=10.0, alpha=1.4, beta=2.6, b_sat=0.30,
                               vol_frac=0.45, ac=1.8, e_min=150.0, e_max=500.0),
    # NiZn drum: higher loss at 100 kHz, about 350 mW/cm^3 at 100 kHz, 100 mT (from memory)
    "unshielded-drum": dict(shape="hard", k=25.0, alpha=1.35, beta=2.6, b_sat=0.28,
                            vol_frac=0.40, ac=1.6, e_min=100.0, e_max=400.0),
    # Iron-alloy powder molded around the coil: about 800 mW/cm^3 at 100 kHz, 100 mT (from memory)
    "metal-composite": dict(shape="soft", k=100.0, alpha=1.2, beta=2.1, b_sat=0.50,
                            vol_frac=0.70, ac=1.5, e_min=600.0, e_max=2000.0),
    # Alloy/iron powder toroid: about 500 mW/cm^3 at 100 kHz, 100 mT (from memory)
    "powder-toroid": dict(shape="soft", k=20.0, alpha=1.3, beta=2.1, b_sat=0.60,
                          vol_frac=0.35, ac=2.0, e_min=150.0, e_max=500.0),
    # MnZn toroid, ungapped: low energy density (high permeability), 150 mW/cm^3 (from memory)
    "ferrite-toroid": dict(shape="hard", k=6.0, alpha=1.4, beta=2.6, b_sat=0.30,
                           vol_frac=0.35, ac=2.0, e_min=25.0, e_max=90.0),
    # Gapped MnZn power-ferrite core on a bobbin: about 160 mW/cm^3 (domain notes range, from memory)
    "gapped-ferrite-core": dict(shape="hard", k=3.5, alpha=1.45, beta=2.6, b_sat=0.32,
                                vol_frac=0.40, ac=2.5, e_min=150.0, e_max=450.0),
}

# Generator-only family data (invented, calibrated from memory against typical datasheets):
# code for ids, geometry fractions g_e = Ae/l^2, g_w = A_window/l^2, g_m = MLT/l, copper fill k_cu,
# sat_drop (inductance drop defining Isat, common practice 10-40 %), tolerance, t_max (C),
# mass density of the body (g/cm^3), price multiplier.
FAMILY_GEN = {
    "shielded-drum-ferrite": dict(code="SDF", g_e=0.16, g_w=0.20, g_m=2.2, k_cu=0.55, drop=0.30,
                                  tol=20, t_max=125, density=3.0, price=1.0),
    "semi-shielded-drum": dict(code="SSD", g_e=0.16, g_w=0.22, g_m=2.2, k_cu=0.55, drop=0.30,
                               tol=20, t_max=125, density=2.9, price=0.85),
    "unshielded-drum": dict(code="UDF", g_e=0.14, g_w=0.30, g_m=2.0, k_cu=0.60, drop=0.10,
                            tol=20, t_max=105, density=2.5, price=0.7),
    "metal-composite": dict(code="MCP", g_e=0.18, g_w=0.15, g_m=2.0, k_cu=0.60, drop=0.20,
                            tol=20, t_max=155, density=5.0, price=1.3),
    "powder-toroid": dict(code="PTR", g_e=0.13, g_w=0.27, g_m=1.7, k_cu=0.10, drop=0.30,
                          tol=15, t_max=130, density=3.0, price=1.2),
    "ferrite-toroid": dict(code="FTR", g_e=0.13, g_w=0.27, g_m=1.7, k_cu=0.05, drop=0.25,
                           tol=25, t_max=125, density=2.2, price=1.0),
    "gapped-ferrite-core": dict(code="GFC", g_e=0.16, g_w=0.065, g_m=2.2, k_cu=0.45, drop=0.20,
                                tol=10, t_max=130, density=2.5, price=1.5),
}

# Body sizes (length x width x height in mm, mounting). Toroids: outer diameter of the wound part
# x the same x height, lying flat. Invented, spanning a 2 x 1.6 x 1 mm chip to 30 mm toroids.
SIZES = {
    "shielded-drum-ferrite": [(3, 3, 1.5, "smd"), (4, 4, 1.8, "smd"), (4, 4, 3, "smd"),
                              (5, 5, 2, "smd"), (5, 5, 4, "smd"), (6, 6, 3, "smd"),
                              (6, 6, 5, "smd"), (8, 8, 4, "smd"), (8, 8, 6, "smd"),
                              (10, 10, 4.5, "smd"), (10, 10, 6, "smd"), (12, 12, 6, "smd"),
                              (12, 12, 8, "smd"), (12, 12, 10, "smd")],
    "semi-shielded-drum": [(3, 3, 1.2, "smd"), (4, 4, 2, "smd"), (5, 5, 3, "smd"),
                           (6, 6, 2.8, "smd"), (8, 8, 3.5, "smd"), (10, 10, 3.8, "smd")],
    "unshielded-drum": [(4.5, 4, 3.2, "smd"), (5.8, 5.2, 4.5, "smd"), (7.8, 7, 5, "smd"),
                        (10, 9, 5.4, "smd"), (8, 8, 10, "tht"), (10, 10, 12, "tht"),
                        (12, 12, 16, "tht")],
    "metal-composite": [(2, 1.6, 1, "smd"), (2, 2, 1, "smd"), (2.5, 2, 1.2, "smd"),
                        (3.2, 2.5, 1.5, "smd"), (4, 4, 2, "smd"), (4.2, 4.2, 3, "smd"),
                        (5.4, 5.2, 3, "smd"), (6.6, 6.4, 3, "smd"), (7.2, 7, 4, "smd"),
                        (7.2, 7, 6, "smd"), (10.5, 10, 5, "smd"), (12.5, 12.5, 6, "smd")],
    "powder-toroid": [(10, 10, 5, "tht"), (13, 13, 7, "tht"), (17, 17, 8, "tht"),
                      (21, 21, 10, "tht"), (25, 25, 12, "tht"), (30, 30, 15, "tht")],
    "ferrite-toroid": [(9, 9, 5, "tht"), (14, 14, 7, "tht"), (18, 18, 9, "tht"),
                       (24, 24, 11, "tht"), (29, 29, 14, "tht")],
    "gapped-ferrite-core": [(13, 13, 10, "smd"), (16, 16, 13, "tht"), (20, 20, 16, "tht"),
                            (23, 23, 19, "tht"), (28, 28, 22, "tht")],
}

# IEC 60063 E12 (domain notes: hard-coded, rounding 10^(i/12) does not reproduce them).
E12 = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2]

RTH_SCALE = 1440.0     # K/W * mm: R_th = 1440/sqrt(A_s[mm^2]): 120 K/W for a 6x6x3 mm SMD drum,
                       # 24 K/W for a 30 mm toroid (common practice fit, from memory)
IRMS_RISE = 40.0       # K, rated temperature rise (domain notes: usually 40 K)
CP_REF = 2.5e-12       # F, winding capacitance of a 10 uH part with l = 4.76 mm (6x6x3): SRF ~32 MHz
CP_L_REF = 4.76e-3     # m (invented, calibrated from memory)
CP_EXP = 0.15          # C_p grows slowly with turns (invented)
D_WIRE_MIN = 0.05e-3   # m, finest magnet wire used (common practice, from memory)
ISAT_MAX = 40.0        # A, no generic part above this
ISAT_MIN = 0.05        # A
DCR_MAX = 30.0         # ohm
DCR_MAX_FACTOR = 1.2   # dcr_max / dcr_typ (common practice: max 15-25 % above typical)
BIG_BODY = 1000e-9     # m^3: bodies at least this big go to 10 mH, smaller ones to 1 mH


def frac(x):
    return x - math.floor(x)


def sig(x, n=4):
    """x rounded to n significant digits, printed without an exponent."""
    if x == 0:
        return "0"
    d = n - 1 - math.floor(math.log10(abs(x)))
    r = round(x, d)
    # rounding may have carried into a new decade (9.9996 -> 10.00)
    d = n - 1 - math.floor(math.log10(abs(r)))
    r = round(x, d)
    s = f"{r:.{max(d, 0)}f}"
    if "." in s:
        s = s.rstrip("0").rstrip(".")
    return s


def sci(x, n=4):
    """x with n significant digits in exponent notation (for SPICE IS)."""
    return f"{x:.{n - 1}e}"


def mm(x):
    return sig(x, 4)


def value_code(l_uh):
    """Our own value code: 1u0, 4u7, 10u, 470u, 1m0, 4m7, 10m."""
    if l_uh < 10:
        whole = int(math.floor(l_uh + 1e-9))
        dec = int(round((l_uh - whole) * 10))
        return f"{whole}u{dec}"
    if l_uh < 1000:
        return f"{int(round(l_uh))}u"
    l_mh = l_uh / 1000.0
    if l_mh < 10:
        whole = int(math.floor(l_mh + 1e-9))
        dec = int(round((l_mh - whole) * 10))
        return f"{whole}m{dec}"
    return f"{int(round(l_mh))}m"


def size_code(l, w, h):
    return "x".join(mm(v) for v in (l, w, h))


def e12_values(l_max_uh):
    out = []
    decade = 1.0
    while decade <= l_max_uh:
        for m in E12:
            v = round(m * decade, 6)
            if v <= l_max_uh + 1e-9:
                out.append(v)
        decade *= 10.0
    return out


INDUCTOR_HEADER = [
    "id", "family", "inductance (uH)", "tolerance (%)", "dcr_typ (mOhm)", "dcr_max (mOhm)",
    "dcr_temperature (C)", "isat (A)", "sat_drop (%)", "irms (A)", "irms_rise (K)", "srf (MHz)",
    "shape", "core_k", "core_alpha", "core_beta", "b_sat (T)", "core_volume (mm3)", "ac_factor",
    "t_max (C)", "mounting", "length (mm)", "width (mm)", "height (mm)", "mass (g)", "price",
    "currency", "notes",
]


def inductor_rows():
    rows = []
    n = 0  # running part index, drives which optional fields are left blank
    for fam_index, (family, fam) in enumerate(FAMILY_DEFAULTS.items()):
        gen = FAMILY_GEN[family]
        w_f = 2.0 * gen["g_m"] / (gen["g_e"] ** 2 * gen["g_w"] * gen["k_cu"])
        for size_index, (ln, wd, ht, mounting) in enumerate(SIZES[family]):
            vol = ln * wd * ht * 1e-9
            ell = vol ** (1.0 / 3.0)
            area_mm2 = 2.0 * (ln * wd + ln * ht + wd * ht)
            # Energy density of this size: a fixed point of the golden-ratio sequence, kept inside
            # 10..90 % of the band so rounding never leaves it.
            pos = 0.1 + 0.8 * frac(0.6180339887 * (7 * fam_index + size_index + 1))
            e = fam["e_min"] + pos * (fam["e_max"] - fam["e_min"])
            energy = e * vol
            dcr_per_h = w_f * RHO_CU_20 * e / (fam["b_sat"] ** 2 * ell ** 2)
            rth = RTH_SCALE / math.sqrt(area_mm2)
            a_l = fam["b_sat"] ** 2 * (gen["g_e"] * ell ** 2) ** 2 / (2.0 * energy)
            n_max = gen["k_cu"] * gen["g_w"] * ell ** 2 / (math.pi / 4.0 * D_WIRE_MIN ** 2)
            l_cap = min(n_max ** 2 * a_l, 10e-3 if vol >= BIG_BODY else 1e-3)
            # Core-material grade of this size: k written for some sizes, scaled 0.8..1.25.
            grade = (0.8, 1.0, 1.25)[size_index % 3]
            for l_uh in e12_values(l_cap * 1e6):
                l0 = l_uh * 1e-6
                if l0 < 4.0 * a_l:  # fewer than 2 turns
                    continue
                isat = math.sqrt(2.0 * energy / l0)
                dcr = dcr_per_h * l0
                irms = math.sqrt(IRMS_RISE / (rth * dcr))
                if not (ISAT_MIN <= isat <= ISAT_MAX) or dcr > DCR_MAX or irms < ISAT_MIN:
                    continue
                cp = CP_REF * (ell / CP_L_REF) * (l_uh / 10.0) ** CP_EXP
                srf = 1.0 / (2.0 * math.pi * math.sqrt(l0 * cp))
                tol = gen["tol"]
                if l_uh <= 2.2 and tol < 30:
                    tol = 30
                log_l = math.log10(l_uh)
                price = (0.04 + 0.75 * (vol * 1e6) ** 0.6) * gen["price"] * (1.0 + 0.05 * log_l)
                mass = gen["density"] * vol * 1e6
                pid = f"GEN-L-{gen['code']}-{size_code(ln, wd, ht)}-{value_code(l_uh)}"
                write_core = size_index % 3 != 1   # grade 1.0 sizes rely on the family default
                row = {
                    "id": pid,
                    "family": family,
                    "inductance (uH)": sig(l_uh),
                    "tolerance (%)": "" if n % 11 == 5 else str(tol),
                    "dcr_typ (mOhm)": sig(dcr * 1e3),
                    "dcr_max (mOhm)": "" if n % 4 == 1 else sig(dcr * DCR_MAX_FACTOR * 1e3),
                    "dcr_temperature (C)": "" if n % 3 == 2 else "20",
                    "isat (A)": sig(isat),
                    "sat_drop (%)": "" if n % 9 == 4 else sig(gen["drop"] * 100, 3),
                    "irms (A)": sig(irms),
                    "irms_rise (K)": "" if n % 5 == 3 else sig(IRMS_RISE, 3),
                    "srf (MHz)": "" if n % 7 == 6 else sig(srf * 1e-6),
                    "shape": "" if n % 2 == 1 else fam["shape"],
                    "core_k": sig(fam["k"] * grade) if write_core else "",
                    "core_alpha": sig(fam["alpha"]) if write_core else "",
                    "core_beta": sig(fam["beta"]) if write_core else "",
                    "b_sat (T)": "" if n % 3 != 0 else sig(fam["b_sat"]),
                    "core_volume (mm3)": "" if n % 4 != 0 else sig(fam["vol_frac"] * vol * 1e9),
                    "ac_factor": "" if n % 5 != 0 else sig(fam["ac"]),
                    "t_max (C)": "" if n % 6 == 5 else str(gen["t_max"]),
                    "mounting": "" if (n % 8 == 7 and mounting == "smd") else mounting,
                    "length (mm)": mm(ln),
                    "width (mm)": mm(wd),
                    "height (mm)": mm(ht),
                    "mass (g)": "" if n % 2 == 0 else sig(mass, 3),
                    "price": "" if n % 10 == 9 else sig(price, 3),
                    "currency": "" if n % 10 == 9 else CURRENCY,
                    "notes": NOTE,
                }
                rows.append(row)
                n += 1
    return INDUCTOR_HEADER, rows


# ----------------------------------------------------------------------------------------------
# Diodes

# Package table. MUST match package_outline() in src/parts/diode.cpp: body length x width x height
# (mm), R_th,ja on a minimum pad (K/W), smd. Dimensions of SMA/SMB/SMC/TO-252/SOD-123 from the
# domain notes (JEDEC outlines); the rest industry-typical (from memory). R_th,ja all common
# practice / from memory. Price per unit at volume (invented).
PACKAGES = {
    "SOD-323": dict(dims=(1.7, 1.25, 0.9), rth=450.0, price=0.03),
    "SOD-123": dict(dims=(2.65, 1.55, 1.35), rth=300.0, price=0.03),
    "SOD-123F": dict(dims=(2.7, 1.6, 1.0), rth=200.0, price=0.04),
    "SMA": dict(dims=(4.3, 2.6, 2.4), rth=100.0, price=0.05),
    "SMB": dict(dims=(4.3, 3.6, 2.3), rth=75.0, price=0.07),
    "SMC": dict(dims=(6.85, 5.9, 2.3), rth=55.0, price=0.12),
    "TO-277": dict(dims=(6.5, 4.6, 1.1), rth=60.0, price=0.15),
    "TO-252": dict(dims=(6.1, 6.5, 2.4), rth=80.0, price=0.20),
    "TO-263": dict(dims=(10.2, 9.2, 4.5), rth=62.0, price=0.35),
    "TO-220": dict(dims=(10.2, 4.6, 15.9), rth=62.0, price=0.30),
    "TO-247": dict(dims=(15.9, 5.0, 20.9), rth=40.0, price=0.80),
    "DO-41": dict(dims=(5.2, 2.7, 2.7), rth=60.0, price=0.03),
    "DO-15": dict(dims=(7.6, 3.6, 3.6), rth=50.0, price=0.05),
    "DO-201": dict(dims=(9.5, 5.3, 5.3), rth=40.0, price=0.10),
}

# Which packages carry which rated current, per technology (invented, industry-typical).
PKG_SCHOTTKY = {0.5: ["SOD-323", "SOD-123"], 1: ["SOD-123", "SOD-123F", "SMA", "DO-41"],
                2: ["SOD-123F", "SMA", "SMB"], 3: ["SMA", "SMB", "SMC", "DO-201", "TO-277"],
                5: ["SMC", "TO-277", "TO-252", "DO-201"], 8: ["TO-277", "TO-252", "TO-220"],
                10: ["TO-277", "TO-252", "TO-220", "TO-263"], 15: ["TO-220", "TO-263"],
                20: ["TO-220", "TO-263", "TO-247"]}
PKG_SIC = {1: ["SMA", "SMB"], 2: ["SMB", "TO-252"], 3: ["SMB", "TO-252"], 5: ["TO-252", "TO-220"],
           8: ["TO-252", "TO-220"], 10: ["TO-220", "TO-263", "TO-247"], 15: ["TO-220", "TO-247"],
           20: ["TO-220", "TO-247"]}
PKG_ULTRAFAST = {0.5: ["SOD-123"], 1: ["SOD-123F", "SMA", "DO-41"], 2: ["SMA", "SMB"],
                 3: ["SMB", "SMC", "DO-201"], 5: ["SMC", "TO-277", "TO-252", "DO-201"],
                 8: ["TO-252", "TO-220"], 10: ["TO-220", "TO-263"], 15: ["TO-220"],
                 20: ["TO-220", "TO-247"]}
PKG_FAST = {0.5: ["SOD-123"], 1: ["SMA", "DO-41"], 2: ["SMB", "DO-15"], 3: ["SMC", "DO-201"],
            5: ["DO-201"]}
PKG_STANDARD = {0.5: ["SOD-123F"], 1: ["SMA", "DO-41"], 2: ["SMB", "DO-15"], 3: ["SMC", "DO-201"],
                5: ["DO-201"]}

# Technology table: id code, voltage classes, packages, N and XTI (equal to the technology defaults
# of the forward fit in src/parts/diode_model.cpp, so a fit with the default N recovers IS and RS), surge factor Ifsm/If (common practice ~25-30x for 8.3 ms, SiC ~8x, from memory),
# tj_max (C), price multiplier, SPICE VJ and M, and CJO per amp of rating at a reference voltage
# class (CJO ~ die area/sqrt(Vrrm), from memory: ~80 pF at 4 V for a 1 A 40 V Schottky).
TECH = {
    "schottky": dict(code="SCH", vrrm=[20, 30, 40, 45, 60, 100, 150, 200], pkgs=PKG_SCHOTTKY,
                     n=1.05, xti=2.0, surge=30.0, tj=150, price=1.2, vj=0.5, m=0.5,
                     cjo_per_a=250e-12, cjo_vref=40.0, cj_vr=4.0),
    "sic-schottky": dict(code="SIC", vrrm=[600, 650, 1200], pkgs=PKG_SIC, n=1.2, xti=2.0,
                         surge=8.0, tj=175, price=6.0, vj=1.5, m=0.5, cjo_per_a=60e-12,
                         cjo_vref=650.0, cj_vr=1.0),
    "ultrafast": dict(code="UFR", vrrm=[100, 200, 400, 600, 800, 1000], pkgs=PKG_ULTRAFAST,
                      n=1.9, xti=3.0, surge=25.0, tj=150, price=1.2, vj=0.7, m=0.4,
                      cjo_per_a=40e-12, cjo_vref=400.0, cj_vr=4.0),
    "fast": dict(code="FST", vrrm=[200, 400, 600, 800, 1000], pkgs=PKG_FAST, n=1.9, xti=3.0,
                 surge=30.0, tj=150, price=1.0, vj=0.7, m=0.4, cjo_per_a=40e-12,
                 cjo_vref=400.0, cj_vr=4.0),
    "standard": dict(code="STD", vrrm=[50, 100, 200, 400, 600, 800, 1000], pkgs=PKG_STANDARD,
                     n=1.8, xti=3.0, surge=30.0, tj=150, price=0.8, vj=0.7, m=0.4,
                     cjo_per_a=40e-12, cjo_vref=400.0, cj_vr=4.0),
}

# Schottky barrier height (eV, = SPICE EG) by voltage class: low-voltage parts use low barriers
# (low Vf, high leakage). Si 0.56-0.75 eV, 4H-SiC ~1.2 eV (Sze & Ng 3rd ed. ch. 3 ranges, from memory).
SCHOTTKY_BARRIER = {20: 0.56, 30: 0.58, 40: 0.60, 45: 0.62, 60: 0.66, 100: 0.72, 150: 0.74,
                    200: 0.75}
SIC_BARRIER = {600: 1.20, 650: 1.20, 1200: 1.25}
A_STAR_SI = 1.12e6    # A/(m^2 K^2), Richardson constant n-Si (Sze & Ng 3rd ed. ch. 3: 112 A/cm^2K^2)
A_STAR_SIC = 1.46e6   # A/(m^2 K^2), 4H-SiC (from memory)
J_SI = 1.0e6          # A/m^2 at rated current: 100 A/cm^2 die current density, Si (from memory)
J_SIC = 2.0e6         # A/m^2, SiC (from memory)
BARRIER_LOWERING = 10.6  # ir(Vrrm)/IS: exp(0.0606/Vt), image-force lowering at 3e7 V/m
                         # (Sze & Ng ch. 3, dphi = sqrt(q E/(4 pi eps_Si)))

# PN diodes: IS per amp of rating (A/A) and RS*If_avg (V) = a + b*(Vrrm/1000 V)^c (invented,
# calibrated from memory on typical Vf at rated current: standard ~0.95 V, fast ~1.0-1.3 V,
# ultrafast ~0.95-1.5 V). Lifetime trr by voltage class (from memory). EG 1.11, XTI 3 (SPICE Si).
PN = {
    "ultrafast": dict(is_per_a=1.2e-8, rs_a=0.05, rs_b=0.55, rs_c=1.5,
                      trr=[(200, 25e-9), (400, 35e-9), (600, 50e-9), (10000, 75e-9)]),
    "fast": dict(is_per_a=1.5e-8, rs_a=0.10, rs_b=0.25, rs_c=1.0,
                 trr=[(200, 150e-9), (600, 250e-9), (10000, 500e-9)]),
    "standard": dict(is_per_a=5e-9, rs_a=0.04, rs_b=0.08, rs_c=1.0,
                     trr=[(400, 2e-6), (10000, 3e-6)]),
}
PN_LEAK_PER_A = 2e-8  # A per A of rating at 25 C, times (1 + Vrrm/500 V) (from memory, typical)
SIC_LEAK_PER_A = 5e-7  # A per A at 25 C, times Vrrm/650 V (from memory: a few uA for 4-10 A parts)
LOW_CURRENT_FRACTION = 0.1  # the low-current forward point is at 10 % of the rating


def thermal_voltage(t):
    return K_BOLTZMANN * t / Q_ELECTRON


def is_at(is_nom, n, eg, xti, t):
    """ngspice diotemp.c (TLEV 0): IS(T) = IS*exp((T/Tnom-1)*EG/(N*Vt(T)))*(T/Tnom)^(XTI/N)."""
    vt = thermal_voltage(t)
    return is_nom * math.exp((t / TNOM - 1.0) * eg / (n * vt)) * (t / TNOM) ** (xti / n)


def vf_at(p, current, t):
    """Forward voltage of the SPICE diode (ngspice): vd = N*Vt*ln(i/IS(T) + 1), v = vd + i*RS."""
    ist = is_at(p["is"], p["n"], p["eg"], p["xti"], t)
    return p["n"] * thermal_voltage(t) * math.log(current / ist + 1.0) + current * p["rs"]


def current_code(i):
    return sig(i, 3) + "A"


DIODE_HEADER = [
    "id", "technology", "vrrm (V)", "if_avg (A)", "ifsm (A)", "vf1 (V)", "if1 (A)", "t1 (C)",
    "vf2 (V)", "if2 (A)", "t2 (C)", "vf3 (V)", "if3 (A)", "t3 (C)", "spice_is (A)", "spice_n",
    "spice_rs (Ohm)", "spice_eg", "spice_xti", "cj (pF)", "cj_vr (V)", "cjo (pF)", "vj (V)", "m",
    "trr (ns)", "qrr (nC)", "recovery_if (A)", "tt (ns)", "ir (uA)", "ir_vr (V)",
    "ir_temperature (C)", "rth_ja (K/W)", "tj_max (C)", "package", "length (mm)", "width (mm)",
    "height (mm)", "price", "currency", "notes",
]


def diode_params(tech, vrrm, i_avg):
    """SPICE forward/capacitance/recovery/leakage of one generic diode (see module docstring)."""
    t = TECH[tech]
    p = dict(n=t["n"], xti=t["xti"])
    vt_nom = thermal_voltage(TNOM)
    if tech in ("schottky", "sic-schottky"):
        sic = tech == "sic-schottky"
        phi = (SIC_BARRIER if sic else SCHOTTKY_BARRIER)[vrrm]
        area = i_avg / (J_SIC if sic else J_SI)
        a_star = A_STAR_SIC if sic else A_STAR_SI
        # Thermionic emission: IS = A*A**T^2*exp(-phi_B/Vt) (Sze & Ng 3rd ed. ch. 3)
        p["is"] = area * a_star * TNOM ** 2 * math.exp(-phi / vt_nom)
        p["eg"] = phi
        # Series drop at rated current: contacts/substrate/package + ideal drift region
        # (Baliga, Fundamentals of Power Semiconductor Devices, 2008: R_on,sp = 5.93e-9*BV^2.5
        # ohm*cm^2 for Si, 2.97e-12*BV^2.5 for 4H-SiC, from memory).
        j_cm2 = (J_SIC if sic else J_SI) * 1e-4
        r_sp = (2.97e-12 if sic else 5.93e-9) * vrrm ** 2.5
        p["rs"] = ((0.35 if sic else 0.10) + j_cm2 * r_sp) / i_avg
        if sic:
            p["ir"] = SIC_LEAK_PER_A * i_avg * vrrm / 650.0
        else:
            p["ir"] = is_at(p["is"], p["n"], p["eg"], p["xti"], T25) * BARRIER_LOWERING
        p["trr"] = 0.0
        p["qrr"] = 0.0
        p["tt"] = 0.0
    else:
        q = PN[tech]
        p["is"] = q["is_per_a"] * i_avg
        p["eg"] = 1.11
        p["rs"] = (q["rs_a"] + q["rs_b"] * (vrrm / 1000.0) ** q["rs_c"]) / i_avg
        p["ir"] = PN_LEAK_PER_A * i_avg * (1.0 + vrrm / 500.0)
        p["trr"] = next(trr for v, trr in q["trr"] if vrrm <= v)
        # Q_rr = 1/2*I_RRM*t_rr (domain notes, Erickson 4.3.2) with I_RRM = the test forward current
        # (IF = IR test condition, common practice); SPICE TT = t_rr stores 2*Q_rr (half recombines,
        # from memory).
        p["qrr"] = 0.5 * p["trr"] * i_avg
        p["tt"] = p["trr"]
    p["cjo"] = t["cjo_per_a"] * i_avg * math.sqrt(t["cjo_vref"] / vrrm)
    p["vj"] = t["vj"]
    p["m"] = t["m"]
    # C_j = CJO/(1 + V_R/VJ)^M (domain notes, SPICE depletion capacitance)
    p["cj"] = p["cjo"] / (1.0 + t["cj_vr"] / p["vj"]) ** p["m"]
    return p


def diode_rows():
    rows = []
    n = 0
    for tech, t in TECH.items():
        for vrrm in t["vrrm"]:
            for i_avg, pkgs in t["pkgs"].items():
                for pkg in pkgs:
                    p = diode_params(tech, vrrm, float(i_avg))
                    outline = PACKAGES[pkg]
                    i_low = LOW_CURRENT_FRACTION * i_avg
                    vf1 = vf_at(p, i_avg, T25)
                    vf2 = vf_at(p, i_low, T25)
                    vf3 = vf_at(p, i_low, T125)
                    schottky = tech in ("schottky", "sic-schottky")
                    # 20 % SPICE form only, 20 % both forms, the rest datasheet points only.
                    form = n % 5
                    spice = form in (0, 1)
                    points = form != 0
                    tj = t["tj"] - (25 if (tech == "schottky" and vrrm <= 30) else 0)
                    price = (outline["price"] * (1.0 + 0.05 * i_avg) * t["price"]
                             * (1.0 + vrrm / 1500.0))
                    blank_dims = n % 4 == 3
                    blank_rec = schottky and n % 2 == 1
                    pid = f"GEN-D-{t['code']}-{vrrm}V-{current_code(i_avg)}-{pkg}"
                    row = {
                        "id": pid,
                        "technology": tech,
                        "vrrm (V)": str(vrrm),
                        "if_avg (A)": sig(i_avg, 3),
                        "ifsm (A)": "" if n % 5 == 2 else sig(t["surge"] * i_avg, 3),
                        "vf1 (V)": sig(vf1) if points else "",
                        "if1 (A)": sig(i_avg, 3) if points else "",
                        "t1 (C)": "25" if points and n % 3 != 0 else "",
                        "vf2 (V)": sig(vf2) if points else "",
                        "if2 (A)": sig(i_low, 3) if points else "",
                        "t2 (C)": "25" if points and n % 3 != 0 else "",
                        "vf3 (V)": sig(vf3) if points else "",
                        "if3 (A)": sig(i_low, 3) if points else "",
                        "t3 (C)": "125" if points else "",
                        "spice_is (A)": sci(p["is"]) if spice else "",
                        "spice_n": sig(p["n"]) if spice else "",
                        "spice_rs (Ohm)": sig(p["rs"]) if spice else "",
                        "spice_eg": sig(p["eg"]) if spice else "",
                        "spice_xti": sig(p["xti"]) if spice else "",
                        "cj (pF)": sig(p["cj"] * 1e12) if points else "",
                        "cj_vr (V)": sig(t["cj_vr"]) if points else "",
                        "cjo (pF)": sig(p["cjo"] * 1e12) if spice else "",
                        "vj (V)": sig(p["vj"]) if spice else "",
                        "m": sig(p["m"]) if spice else "",
                        "trr (ns)": "" if blank_rec else sig(p["trr"] * 1e9),
                        "qrr (nC)": "" if blank_rec else sig(p["qrr"] * 1e9),
                        "recovery_if (A)": "" if schottky else sig(i_avg, 3),
                        "tt (ns)": sig(p["tt"] * 1e9) if spice and not schottky else "",
                        "ir (uA)": sig(p["ir"] * 1e6),
                        "ir_vr (V)": str(vrrm),
                        "ir_temperature (C)": "" if n % 4 == 2 else "25",
                        "rth_ja (K/W)": "" if n % 6 == 4 else sig(outline["rth"]),
                        "tj_max (C)": "" if n % 7 == 3 else str(tj),
                        "package": pkg,
                        "length (mm)": "" if blank_dims else mm(outline["dims"][0]),
                        "width (mm)": "" if blank_dims else mm(outline["dims"][1]),
                        "height (mm)": "" if blank_dims else mm(outline["dims"][2]),
                        "price": "" if n % 9 == 8 else sig(price, 3),
                        "currency": "" if n % 9 == 8 else CURRENCY,
                        "notes": NOTE,
                    }
                    rows.append(row)
                    n += 1
    return DIODE_HEADER, rows


def write_csv(path, header, rows):
    ids = [r["id"] for r in rows]
    if len(ids) != len(set(ids)):
        raise SystemExit(f"{path}: duplicate ids")
    # Plain RFC 4180 with "\n" line ends; no cell needs quoting (asserted).
    lines = [",".join(header)]
    for r in rows:
        cells = [r[h] for h in header]
        for c in cells:
            if any(ch in c for ch in ',"\n'):
                raise SystemExit(f"{path}: cell needs quoting: {c!r}")
        lines.append(",".join(cells))
    with open(path, "w", encoding="utf-8", newline="") as f:
        f.write("\n".join(lines) + "\n")


def main():
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    out = os.path.join(root, "data", "starter")
    os.makedirs(out, exist_ok=True)
    header, rows = inductor_rows()
    write_csv(os.path.join(out, "inductors.csv"), header, rows)
    print(f"inductors.csv: {len(rows)} parts")
    header, rows = diode_rows()
    write_csv(os.path.join(out, "diodes.csv"), header, rows)
    print(f"diodes.csv: {len(rows)} parts")


if __name__ == "__main__":
    main()
