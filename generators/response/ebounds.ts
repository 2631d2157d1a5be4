/** EBOUNDS (OGIP CAL/GEN/92-002): nominal energy bounds of each channel, from the channel grid. */
import type { Ebounds } from './types.ts';
import type { ChannelGrid } from './model-types.ts';
import { channelBoundsKeV } from './grid.ts';

export function eboundsFromChannels(g: ChannelGrid): Ebounds {
  const b = channelBoundsKeV(g);
  return { firstChannel: g.firstChannel, eMinKeV: b.slice(0, g.count), eMaxKeV: b.slice(1) };
}
