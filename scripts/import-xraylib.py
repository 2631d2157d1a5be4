#!/usr/bin/python3
"""Import element X-ray data from Debian's python3-xraylib into a browser-importable TypeScript module.

Run once (and again only to refresh the table), with the system interpreter that carries xraylib:

    /usr/bin/python3 scripts/import-xraylib.py --generated YYYY-MM-DD \
        > generators/physics/data/xray-elements.ts

The output depends only on the xraylib version and the --generated string (no clock), so reruns are
byte-identical.

What it stores, for Z = 1..30 (H..Zn):
  * CS_Photo and CS_Total (cm2/g) on a grid from 0.1 to 20 keV, split into segments at every
    absorption edge present in xraylib's cross-section data. Inside a segment the energies are
    uniform in log E (n points from eLo to eHi inclusive), so only the values are stored. eLo of a
    segment is the edge itself and its first value is xraylib's value at the edge (xraylib returns
    the above-edge value there); eHi is the next edge and its last value is xraylib's value at the
    largest double below that edge. Interpolating log-log inside a segment therefore never crosses
    an edge.
  * n is chosen per segment (at least MIN_POINTS_PER_DECADE, doubled until the log-log
    interpolation error at 1/4, 1/2 and 3/4 of every interval is below INTERPOLATION_TARGET).
  * Edge energies from EdgeEnergy for K, L1-L3, M1-M5, and the location of each edge in the
    cross-section data (found by bisection; they differ from EdgeEnergy by up to ~2 % for light
    elements, e.g. O K 0.532 vs 0.543 keV, and the segments follow the cross sections).
  * K alpha line energies LineEnergy(KL3_LINE) (K alpha1, the one called kAlphaKeV) and
    LineEnergy(KL2_LINE); FluorYield(K_SHELL); JumpFactor(K_SHELL); AtomicWeight; ElementDensity;
    AtomicNumberToSymbol.

Why 0.1 keV and not lower: xraylib 4.0.0's cross sections start at 0.1 keV (it refuses to
extrapolate below), so the table does too.
"""
import argparse
import math
import re
import sys

import xraylib as xrl

Z_MIN, Z_MAX = 1, 30
E_MIN_KEV, E_MAX_KEV = 0.1, 20.0
# Coarsest grid tried per segment; refined by doubling until the interpolation target is met.
MIN_POINTS_PER_DECADE = 60
# Short segments (e.g. between L3 and L2) still get a few points.
MIN_POINTS_PER_SEGMENT = 4
# Log-log interpolation error target inside segments (the requirement is 0.5 %; keep margin
# for the 5-significant-digit rounding of the stored values).
INTERPOLATION_TARGET = 1.0e-3
SIGNIFICANT_DIGITS = 5
# Edge search: scan step in ln E and the per-step ratio that marks a discontinuity. Smooth parts of
# these cross sections change by < 0.5 % per step at this density; the weakest edge in range
# (Zn M1) jumps by ~5 %.
SCAN_STEPS = 40000
JUMP_RATIO_MIN = 1.01
SHELLS = [
    ('K', xrl.K_SHELL), ('L1', xrl.L1_SHELL), ('L2', xrl.L2_SHELL), ('L3', xrl.L3_SHELL),
    ('M1', xrl.M1_SHELL), ('M2', xrl.M2_SHELL), ('M3', xrl.M3_SHELL), ('M4', xrl.M4_SHELL),
    ('M5', xrl.M5_SHELL),
]


def fmt(v):
    """Rounded to SIGNIFICANT_DIGITS, shortest JS-readable text."""
    s = '%.*g' % (SIGNIFICANT_DIGITS, v)
    if 'e' in s:
        m, e = s.split('e')
        s = '%se%d' % (m, int(e))
    return s


def exact(v):
    """Full precision (segment bounds must match the edge location exactly)."""
    return repr(float(v))


def safe(f, *a):
    try:
        v = f(*a)
    except ValueError:
        return None
    return v


def find_discontinuities(z):
    """Energies (keV) of the upward jumps of CS_Photo in [E_MIN, E_MAX]: (below, above) adjacent doubles."""
    la, lb = math.log(E_MIN_KEV), math.log(E_MAX_KEV)
    out = []
    prev_e, prev_v = None, None
    for i in range(SCAN_STEPS + 1):
        e = math.exp(la + (lb - la) * i / SCAN_STEPS)
        if i == 0:
            e = E_MIN_KEV
        if i == SCAN_STEPS:
            e = E_MAX_KEV
        v = xrl.CS_Photo(z, e)
        if prev_v is not None and v > prev_v * JUMP_RATIO_MIN:
            lo, hi = prev_e, e
            v_lo = prev_v
            while math.nextafter(lo, hi) < hi:
                mid = 0.5 * (lo + hi)
                if mid <= lo or mid >= hi:
                    break
                if xrl.CS_Photo(z, mid) > v_lo * JUMP_RATIO_MIN:
                    hi = mid
                else:
                    lo = mid
            out.append((lo, hi))
        prev_e, prev_v = e, v
    return out


def edge_table(z):
    edges = []
    for name, shell in SHELLS:
        e = safe(xrl.EdgeEnergy, z, shell)
        if e is not None and e > 0:
            edges.append((name, e))
    return edges


def segment_values(z, a, b, a_eval, b_eval, n):
    """CS values at n log-uniform energies from a to b; endpoints evaluated at a_eval / b_eval."""
    la, lb = math.log(a), math.log(b)
    es = [math.exp(la + (lb - la) * i / (n - 1)) for i in range(n)]
    es[0], es[-1] = a_eval, b_eval
    photo = [xrl.CS_Photo(z, e) for e in es]
    total = [xrl.CS_Total(z, e) for e in es]
    return es, photo, total


def max_interp_error(z, a, b, n, photo, total):
    la, lb = math.log(a), math.log(b)
    worst = 0.0
    for i in range(n - 1):
        for t in (0.25, 0.5, 0.75):
            le = la + (lb - la) * (i + t) / (n - 1)
            e = math.exp(le)
            for f, vals in ((xrl.CS_Photo, photo), (xrl.CS_Total, total)):
                approx = math.exp(math.log(vals[i]) * (1 - t) + math.log(vals[i + 1]) * t)
                worst = max(worst, abs(approx / f(z, e) - 1))
    return worst


def build_element(z):
    symbol = xrl.AtomicNumberToSymbol(z)
    disc = find_discontinuities(z)
    shells_in_range = [(n, e) for n, e in edge_table(z) if E_MIN_KEV <= e <= E_MAX_KEV]
    # Pair data discontinuities with EdgeEnergy shells in energy order; they must correspond.
    shells_sorted = sorted(shells_in_range, key=lambda t: t[1])
    if len(shells_sorted) != len(disc):
        sys.exit('%s: %d EdgeEnergy edges in range %s but %d cross-section jumps %s'
                 % (symbol, len(shells_sorted), shells_sorted, len(disc), disc))
    table_edges = {}
    for (name, e_edge), (lo, hi) in zip(shells_sorted, disc):
        if abs(math.log(hi / e_edge)) > 0.05:
            sys.exit('%s %s: EdgeEnergy %g keV but the cross-section jump is at %g keV' % (symbol, name, e_edge, hi))
        table_edges[name] = (lo, hi)

    bounds = [(E_MIN_KEV, E_MIN_KEV)] + [lohi for lohi in disc] + [(E_MAX_KEV, E_MAX_KEV)]
    segments = []
    worst_all = 0.0
    for k in range(len(bounds) - 1):
        a = bounds[k][1]          # the edge (above-side value returned there)
        b_lo, b = bounds[k + 1]   # next edge: evaluate at the double just below it
        decades = math.log10(b / a)
        n = max(MIN_POINTS_PER_SEGMENT, math.ceil(MIN_POINTS_PER_DECADE * decades) + 1)
        while True:
            es, photo, total = segment_values(z, a, b, a, b_lo, n)
            worst = max_interp_error(z, a, b, n, photo, total)
            if worst <= INTERPOLATION_TARGET:
                break
            n = 2 * n - 1
            if n > 20000:
                sys.exit('%s segment %g-%g keV: interpolation does not converge (hidden edge?)' % (symbol, a, b))
        worst_all = max(worst_all, worst)
        segments.append((a, b, photo, total))

    edges_out = []
    for name, e in edge_table(z):
        t = table_edges.get(name)
        edges_out.append((name, e, t[1] if t else None))
    info = {
        'z': z,
        'symbol': symbol,
        'atomicWeight': xrl.AtomicWeight(z),
        'densityGcm3': safe(xrl.ElementDensity, z),
        'kAlphaKeV': safe(xrl.LineEnergy, z, xrl.KL3_LINE),
        'kAlpha2KeV': safe(xrl.LineEnergy, z, xrl.KL2_LINE),
        'kFluorescenceYield': safe(xrl.FluorYield, z, xrl.K_SHELL),
        'kJumpRatio': safe(xrl.JumpFactor, z, xrl.K_SHELL),
    }
    return info, edges_out, segments, worst_all


def opt(v, f=fmt):
    return 'null' if v is None else f(v)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split('\n')[0])
    ap.add_argument('--generated', required=True, help='generation date written into the provenance (YYYY-MM-DD)')
    args = ap.parse_args()
    if not re.fullmatch(r'\d{4}-\d{2}-\d{2}', args.generated):
        sys.exit('--generated must be YYYY-MM-DD, got %r' % args.generated)

    version = getattr(xrl, '__version__', 'unknown')
    elements = [build_element(z) for z in range(Z_MIN, Z_MAX + 1)]
    worst = max(e[3] for e in elements)

    w = sys.stdout.write
    w('// Generated by scripts/import-xraylib.py; do not edit by hand. Rerun the script to refresh.\n')
    w("import type { XrayTable } from './xray-table-types.ts';\n\n")
    w('export const XRAY_TABLE: XrayTable = {\n')
    w('  provenance: {\n')
    w("    library: 'xraylib (Debian python3-xraylib)',\n")
    w("    libraryVersion: '%s',\n" % version)
    w("    generated: '%s',\n" % args.generated)
    w("    script: 'scripts/import-xraylib.py',\n")
    w("    functions: ['CS_Photo', 'CS_Total', 'EdgeEnergy', 'LineEnergy(KL3_LINE)', 'LineEnergy(KL2_LINE)', "
      "'FluorYield(K_SHELL)', 'JumpFactor(K_SHELL)', 'AtomicWeight', 'ElementDensity', 'AtomicNumberToSymbol'],\n")
    w("    grid: 'per element, segments between the cross-section edges in [%g, %g] keV; inside a segment n energies "
      "uniform in log E from eLoKeV to eHiKeV inclusive; first value at the edge (above side), last value at the "
      "largest double below the next edge; n from %d points/decade (min %d), doubled until log-log error < %g',\n"
      % (E_MIN_KEV, E_MAX_KEV, MIN_POINTS_PER_DECADE, MIN_POINTS_PER_SEGMENT, INTERPOLATION_TARGET))
    w("    units: 'cross sections cm2/g, energies keV, density g/cm3',\n")
    w('    significantDigits: %d,\n' % SIGNIFICANT_DIGITS)
    w('    maxInterpolationError: %s,\n' % fmt(worst))
    w("    kAlpha: 'kAlphaKeV is LineEnergy(KL3_LINE) (K-L3, K alpha1); kAlpha2KeV is LineEnergy(KL2_LINE)',\n")
    w("    edges: 'edgeKeV from EdgeEnergy; tableEdgeKeV is where the cross-section data jump (null outside the range)',\n")
    w('  },\n')
    w('  energyMinKeV: %s,\n  energyMaxKeV: %s,\n' % (exact(E_MIN_KEV), exact(E_MAX_KEV)))
    w('  elements: [\n')
    for info, edges, segments, _ in elements:
        w('    {\n')
        w("      z: %d, symbol: '%s', atomicWeight: %s, densityGcm3: %s,\n"
          % (info['z'], info['symbol'], fmt(info['atomicWeight']), opt(info['densityGcm3'])))
        w('      kAlphaKeV: %s, kAlpha2KeV: %s, kFluorescenceYield: %s, kJumpRatio: %s,\n'
          % (opt(info['kAlphaKeV']), opt(info['kAlpha2KeV']), opt(info['kFluorescenceYield']), opt(info['kJumpRatio'])))
        w('      edges: [%s],\n' % ', '.join(
            "{ shell: '%s', edgeKeV: %s, tableEdgeKeV: %s }" % (n, fmt(e), opt(t, exact)) for n, e, t in edges))
        w('      segments: [\n')
        for a, b, photo, total in segments:
            w('        {\n')
            w('          eLoKeV: %s, eHiKeV: %s,\n' % (exact(a), exact(b)))
            w('          photo: [%s],\n' % ','.join(fmt(v) for v in photo))
            w('          total: [%s],\n' % ','.join(fmt(v) for v in total))
            w('        },\n')
        w('      ],\n')
        w('    },\n')
    w('  ],\n};\n')


if __name__ == '__main__':
    main()
