"""Write testdata/iapws_water.json: liquid-water properties from python-iapws.

Run with Debian's interpreter and package (apt-get install python3-iapws; the
fixture was made with Debian's python3-iapws 1.5.3-1, whose iapws.__version__
reads 1.5.2):

    /usr/bin/python3 testdata/iapws/gen.py > testdata/iapws_water.json
    /usr/bin/python3 testdata/iapws/gen.py testdata/iapws_water.json   # same bytes

Output is deterministic (fixed points, fixed number formatting, no dates), so
rerunning must reproduce the committed file byte for byte. measure/if97_test.go
reads it.

Points: 35-200 F every 5 F at 1 atm (0.101325 MPa), a few SI points at 1 atm,
110 and 120 C at 1 kPa above saturation (where measure evaluates hot water), and
the three state points of the IF97 release's region 1 verification table, each
with IAPWS97(T=K, P=MPa).rho, .cp and .h; and saturation pressures from the
region 4 equation (iapws.iapws97._PSat_T).
"""

import sys

import iapws
from iapws import IAPWS97
from iapws.iapws97 import _PSat_T

P_ATM_MPA = 0.101325


def num(x):
    """Fixed formatting: 15 significant digits, enough to round-trip IF97."""
    return format(x, ".15g")


def state(label, t_k, p_mpa, t_f=None, t_c=None):
    w = IAPWS97(T=t_k, P=p_mpa)
    if w.region != 1:
        raise SystemExit("%s: IAPWS97 chose region %s, want 1" % (label, w.region))
    fields = ['"label": "%s"' % label]
    if t_f is not None:
        fields.append('"t_f": %s' % num(t_f))
    if t_c is not None:
        fields.append('"t_c": %s' % num(t_c))
    fields += [
        '"t_k": %s' % num(t_k),
        '"p_mpa": %s' % num(p_mpa),
        '"rho_kg_m3": %s' % num(w.rho),
        '"cp_kj_kg_k": %s' % num(w.cp),
        '"h_kj_kg": %s' % num(w.h),
    ]
    return "    {" + ", ".join(fields) + "}"


def main():
    states = []
    for t_f in range(35, 201, 5):
        t_k = (t_f - 32) / 1.8 + 273.15
        states.append(state("%d F, 1 atm" % t_f, t_k, P_ATM_MPA, t_f))
    for t_c in (1, 5, 10, 20, 40, 60, 80, 95):
        states.append(state("%d C, 1 atm" % t_c, t_c + 273.15, P_ATM_MPA, t_c=t_c))
    # Above 100 C water at 1 atm boils; measure evaluates it 1 kPa above psat.
    for t_c in (110, 120):
        t_k = t_c + 273.15
        p = _PSat_T(t_k) + 0.001
        states.append(state("%d C, psat + 1 kPa" % t_c, t_k, p, t_c=t_c))
    for t_k, p in ((300, 3), (300, 80), (500, 3)):
        states.append(state("%d K, %d MPa" % (t_k, p), float(t_k), float(p)))

    psat = []
    for t_k in (273.16, 300, 373.15, 500, 600):
        psat.append('    {"t_k": %s, "p_mpa": %s}' % (num(t_k), num(_PSat_T(t_k))))

    out = "\n".join([
        "{",
        '  "source": "python3-iapws (Debian 1.5.3-1; iapws.__version__ %s), IAPWS97(T, P) and iapws97._PSat_T",' % iapws.__version__,
        '  "generator": "testdata/iapws/gen.py",',
        '  "units": {"t_f": "degF", "t_c": "degC", "t_k": "K", "p_mpa": "MPa", "rho_kg_m3": "kg/m3", "cp_kj_kg_k": "kJ/(kg K)", "h_kj_kg": "kJ/kg"},',
        '  "states": [',
        ",\n".join(states),
        "  ],",
        '  "psat": [',
        ",\n".join(psat),
        "  ]",
        "}",
        "",
    ])
    if len(sys.argv) > 1:
        with open(sys.argv[1], "w", encoding="ascii", newline="\n") as f:
            f.write(out)
    else:
        sys.stdout.write(out)


if __name__ == "__main__":
    main()
