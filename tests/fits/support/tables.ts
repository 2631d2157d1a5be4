/** Test inputs: a table with every supported column type (invented values). */
import type { HduInput } from '../../../generators/fits/index.ts';

export const ALL_TYPES_HDUS: HduInput[] = [
  { kind: 'primary', cards: [{ keyword: 'DATE', value: '2024-01-01' }, { keyword: 'HISTORY', comment: 'column-type test table, invented values' }] },
  {
    kind: 'bintable',
    name: 'ALLTYPES',
    columns: [
      { name: 'LOGIC', tform: '1L', data: [true, false, true] },
      { name: 'BYTE', tform: '1B', data: [0, 255, 7] },
      { name: 'SHORT', tform: '1I', data: [-32768, 32767, 1] },
      { name: 'INT', tform: '1J', data: [-2147483648, 2147483647, 5] },
      { name: 'LONG', tform: '1K', data: [-(2n ** 62n), 2n ** 53n + 1n, 3n] },
      { name: 'FLOAT', tform: '1E', unit: 'keV', data: [1.5, -2.25, 1e-30] },
      { name: 'DOUBLE', tform: '1D', unit: 's', data: [Math.PI, -1e300, 5e-324] },
      { name: 'TEXT', tform: '8A', data: ['ab', "O'Hara", ''] },
      { name: 'VEC3E', tform: '3E', data: [[1, 2, 3], [4, 5, 6], [7, 8.5, -9]] },
      { name: 'VEC2J', tform: '2J', data: [[1, -2], [3, 4], [5, 6]] },
      { name: 'VLA_E', tform: '1PE', data: [[1, 2], [], [3, 4, 0.1]] },
      { name: 'VLA_J', tform: '1PJ', tlmin: 1, tlmax: 100, data: [[1], [2, 3], []] },
      { name: 'VLA_I', tform: '1PI', data: [[-1], [2, 3], [4]] },
      { name: 'VLA_D', tform: '1PD', data: [[0.1], [], [2, Number.MAX_VALUE]] },
      { name: 'VLA_B', tform: '1PB', data: [[1, 2, 3], [], [255]] },
    ],
  },
];
