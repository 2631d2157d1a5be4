/**
 * Energy and channel grids against their definitions: contiguous bins with the stated linear or
 * logarithmic spacing, and the channel-bound contract of generators/response/model-types.ts
 * (OGIP CAL/GEN/92-002 asks for contiguous ENERG_LO/ENERG_HI and one E_MIN/E_MAX per channel).
 */
import { describe, expect, it } from 'vitest';
import { channelBoundsKeV, checkEnergyBins, energyGrid } from '../../generators/response/grid.ts';
import { eboundsFromChannels } from '../../generators/response/ebounds.ts';
import { KilnInputError } from '../../generators/errors.ts';

function inputError(f: () => unknown): KilnInputError {
  try {
    f();
  } catch (e) {
    if (e instanceof KilnInputError) return e;
    throw e;
  }
  throw new Error('no error thrown');
}

describe('energy grid', () => {
  it('linear and log grids are contiguous, span [min, max], and have the stated spacing', () => {
    const lin = energyGrid({ minKeV: 0.1, maxKeV: 10.1, bins: 100, spacing: 'linear' });
    expect(lin.loKeV[0]).toBe(0.1);
    expect(lin.hiKeV[99]).toBe(10.1);
    for (let i = 1; i < 100; i++) expect(lin.loKeV[i]).toBe(lin.hiKeV[i - 1]);
    expect(lin.hiKeV[10] - lin.loKeV[10]).toBeCloseTo(0.1, 12);
    const log = energyGrid({ minKeV: 0.1, maxKeV: 10, bins: 200, spacing: 'log' });
    expect(log.hiKeV[0] / log.loKeV[0]).toBeCloseTo(log.hiKeV[150] / log.loKeV[150], 12);
    expect(log.hiKeV[199]).toBe(10);
  });

  it('rejects bad specs naming the field and value', () => {
    let e = inputError(() => energyGrid({ minKeV: 5, maxKeV: 2, bins: 10, spacing: 'linear' }));
    expect(e.where.field).toBe('energyGrid.maxKeV');
    expect(e.where.value).toBe(2);
    e = inputError(() => energyGrid({ minKeV: 0, maxKeV: 2, bins: 10, spacing: 'log' }));
    expect(e.where.field).toBe('energyGrid.minKeV');
    e = inputError(() => energyGrid({ minKeV: 1, maxKeV: 2, bins: 2.5, spacing: 'linear' }));
    expect(e.where.field).toBe('energyGrid.bins');
  });

  it('rejects non-monotonic and overlapping explicit bins naming the index', () => {
    const ok = { loKeV: Float64Array.of(0.1, 0.2, 0.4), hiKeV: Float64Array.of(0.2, 0.3, 0.5) };
    expect(checkEnergyBins(ok)).toBe(ok);
    let e = inputError(() => checkEnergyBins({ loKeV: Float64Array.of(0.1, 0.15), hiKeV: Float64Array.of(0.2, 0.3) }));
    expect(e.where.field).toBe('energyBins.loKeV[1]');
    expect(e.where.value).toBe(0.15);
    e = inputError(() => checkEnergyBins({ loKeV: Float64Array.of(0.3, 0.1), hiKeV: Float64Array.of(0.4, 0.2) }));
    expect(e.where.field).toBe('energyBins.loKeV[1]');
    e = inputError(() => checkEnergyBins({ loKeV: Float64Array.of(0.3), hiKeV: Float64Array.of(0.3) }));
    expect(e.where.field).toBe('energyBins.hiKeV[0]');
  });
});

describe('channel grid and EBOUNDS (OGIP CAL/GEN/92-002 EBOUNDS: CHANNEL, E_MIN, E_MAX)', () => {
  it('channel c spans [(c − first)·w, (c − first + 1)·w] + origin (model-types.ts contract)', () => {
    const g = { count: 4, firstChannel: 1, widthEv: 10, originEv: 5 };
    expect(Array.from(channelBoundsKeV(g))).toEqual([0.005, 0.015, 0.025, 0.035, 0.045]);
    const eb = eboundsFromChannels(g);
    expect(eb.firstChannel).toBe(1);
    expect(Array.from(eb.eMinKeV)).toEqual([0.005, 0.015, 0.025, 0.035]);
    expect(Array.from(eb.eMaxKeV)).toEqual([0.015, 0.025, 0.035, 0.045]);
  });

  it('rejects non-ascending channels and bad counts', () => {
    let e = inputError(() => channelBoundsKeV({ count: 10, firstChannel: 0, widthEv: -5, originEv: 0 }));
    expect(e.where.field).toBe('channels.widthEv');
    expect(e.where.value).toBe(-5);
    e = inputError(() => channelBoundsKeV({ count: 0, firstChannel: 0, widthEv: 5, originEv: 0 }));
    expect(e.where.field).toBe('channels.count');
    e = inputError(() => channelBoundsKeV({ count: 10, firstChannel: 2, widthEv: 5, originEv: 0 }));
    expect(e.where.field).toBe('channels.firstChannel');
  });
});
