/**
 * The range over which a response is complete: channels whose energy bounds lie inside the
 * response energy grid (photons outside the grid are not modelled, so a channel beyond it gets no
 * model and one below its start misses what lower photons would put there), and the energy range
 * those channels cover. The grid and channels are consistent when the grid reaches the top channel
 * (or the channels stop where the grid does) and starts at or below the event threshold (or the
 * lowest channel), each within one channel width.
 */
import type { ChannelGrid, EnergyGridSpec } from './model-types.ts';

export interface ValidRange {
  /** First and last channel number (as in EBOUNDS CHANNEL) that the model covers completely. */
  channels: [number, number];
  /** E_MIN of the first and E_MAX of the last of those channels, keV. */
  energyKeV: [number, number];
  /** Channel-range energies, keV, for the consistency message. */
  channelSpanKeV: [number, number];
  gridKeV: [number, number];
  /** The grid reaches the top channel and starts at the threshold or the lowest channel. */
  consistent: boolean;
  /** What is missing when not consistent (plain words), empty otherwise. */
  gaps: string[];
}

/** Relative slack for energies written as decimal text (1e-9). */
const SLACK = 1e-9;

export function validRange(channels: ChannelGrid, grid: EnergyGridSpec, thresholdKeV: number): ValidRange {
  const w = channels.widthEv / 1000;
  const o = channels.originEv / 1000;
  const lowKeV = o;
  const highKeV = o + channels.count * w;
  const first = Math.max(0, Math.ceil((grid.minKeV - o) / w - SLACK));
  const last = Math.min(channels.count - 1, Math.floor((grid.maxKeV - o) / w + SLACK) - 1);
  const gaps: string[] = [];
  if (highKeV - grid.maxKeV > w * (1 + SLACK))
    gaps.push(`channels run to ${fmt(highKeV)} keV but the energy grid stops at ${fmt(grid.maxKeV)} keV`);
  const needFrom = Math.max(thresholdKeV, lowKeV);
  if (grid.minKeV - needFrom > w * (1 + SLACK))
    gaps.push(`events are recorded from ${fmt(needFrom)} keV but the energy grid starts at ${fmt(grid.minKeV)} keV`);
  return {
    channels: [first + channels.firstChannel, last + channels.firstChannel],
    energyKeV: [o + first * w, o + (last + 1) * w],
    channelSpanKeV: [lowKeV, highKeV],
    gridKeV: [grid.minKeV, grid.maxKeV],
    consistent: gaps.length === 0,
    gaps,
  };
}

function fmt(x: number): string {
  return String(Number(x.toPrecision(6)));
}
