/** Wall clock, CPU time and peak RSS of the current process over one case, with named phases. */

export interface CaseResult {
  case: string;
  wallS: number;
  cpuS: number;
  peakRssMB: number;
  bytesWritten: number;
  nnz: number;
  /** Wall time of each phase, s. */
  phases: Record<string, number>;
  /** Files written (the floor re-reads them). */
  files: string[];
  [extra: string]: unknown;
}

const US_PER_S = 1e6;
const KB_PER_MB = 1024;

export const round = (x: number, digits = 3): number => Number(x.toFixed(digits));

export class Clock {
  private readonly t0 = performance.now();
  private readonly cpu0 = process.cpuUsage();
  private last = this.t0;
  readonly phases: Record<string, number> = {};

  /** Ends the current phase under `name`. */
  lap(name: string): void {
    const t = performance.now();
    this.phases[name] = round((t - this.last) / 1000);
    this.last = t;
  }

  result(name: string, extra: { bytesWritten: number; nnz: number; files: string[]; [k: string]: unknown }): CaseResult {
    const wallS = (performance.now() - this.t0) / 1000;
    const cpu = process.cpuUsage(this.cpu0);
    return {
      case: name,
      wallS: round(wallS),
      cpuS: round((cpu.user + cpu.system) / US_PER_S),
      // maxRSS is in kilobytes (getrusage ru_maxrss on Linux) and covers the whole process life.
      peakRssMB: round(process.resourceUsage().maxRSS / KB_PER_MB, 1),
      phases: this.phases,
      ...extra,
    };
  }
}
