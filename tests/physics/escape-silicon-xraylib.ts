/**
 * Silicon atomic data from Debian's python3-xraylib for tests: ω_K, K jump ratio, K edge, Kα1
 * (KL3) energy and total attenuation μ/ρ (cm²/g) at requested energies.
 */
import { runPythonJson } from '../support/python.ts';
import type { EscapeInputs } from '../../generators/physics/escape.ts';

export interface SiliconRef {
  fluorescenceYield: number;
  jumpRatio: number;
  kEdgeKeV: number;
  kAlphaKeV: number;
  mu: Record<string, number>;
}

export function siliconFromXraylib(energiesKeV: number[]): SiliconRef {
  return runPythonJson<SiliconRef>(
    'xraylib',
    `import json, sys, xraylib as x
es = json.load(sys.stdin)
ka = x.LineEnergy(14, x.KL3_LINE)
mu = {repr(float(e)): x.CS_Total(14, e) for e in es + [ka]}
print(json.dumps({"fluorescenceYield": x.FluorYield(14, x.K_SHELL), "jumpRatio": x.JumpFactor(14, x.K_SHELL),
  "kEdgeKeV": x.EdgeEnergy(14, x.K_SHELL), "kAlphaKeV": ka, "mu": mu}))`,
    energiesKeV,
  );
}

/** EscapeInputs whose μ(E) answers only at the energies asked for (throws otherwise), so no interpolation hides. */
export function exactEscapeInputs(ref: SiliconRef): EscapeInputs {
  return {
    fluorescenceYield: ref.fluorescenceYield,
    jumpRatio: ref.jumpRatio,
    kEdgeKeV: ref.kEdgeKeV,
    kAlphaKeV: ref.kAlphaKeV,
    attenuation: (e) => {
      const key = Object.keys(ref.mu).find((k) => Math.abs(Number(k) - e) < 1e-12);
      if (key === undefined) throw new Error(`no xraylib μ at ${e} keV`);
      return ref.mu[key];
    },
  };
}

/** EscapeInputs with μ(E) log-log interpolated on a dense xraylib table (for matrix builds). */
export function tabulatedEscapeInputs(): EscapeInputs {
  const es: number[] = [];
  for (let e = 0.5; e < 20; e *= 1.01) es.push(e); // xraylib tables start near 0.1 keV; escape needs only E > Kα
  const ref = runPythonJson<{ w: number; j: number; edge: number; ka: number; mu: number[] }>(
    'xraylib',
    `import json, sys, xraylib as x
es = json.load(sys.stdin)
edge = x.EdgeEnergy(14, x.K_SHELL)
mu = [x.CS_Total(14, e) for e in es]
print(json.dumps({"w": x.FluorYield(14, x.K_SHELL), "j": x.JumpFactor(14, x.K_SHELL), "edge": edge, "ka": x.LineEnergy(14, x.KL3_LINE), "mu": mu}))`,
    es,
  );
  const lx = es.map(Math.log);
  const ly = ref.mu.map(Math.log);
  return {
    fluorescenceYield: ref.w,
    jumpRatio: ref.j,
    kEdgeKeV: ref.edge,
    kAlphaKeV: ref.ka,
    attenuation: (e) => {
      const x = Math.log(e);
      let i = Math.min(lx.length - 2, Math.max(0, Math.floor((x - lx[0]) / Math.log(1.01))));
      // never interpolate across the edge
      if (es[i] < ref.edge && es[i + 1] > ref.edge) i = e > ref.edge ? i + 1 : i - 1;
      const t = (x - lx[i]) / (lx[i + 1] - lx[i]);
      return Math.exp(ly[i] + t * (ly[i + 1] - ly[i]));
    },
  };
}
