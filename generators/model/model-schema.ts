/**
 * JSON Schema (draft 2020-12) of the model document kiln/model/1, published beside every
 * release's model.json as model.schema.json, and enforced on every document Kiln reads
 * (validate-json.ts). Parts that other model changes may extend (stack, redistribution) require
 * their known fields and allow more; the envelope is closed.
 */
const num = { type: 'number' };
const pos = { type: 'number', exclusiveMinimum: 0 };
const nonNeg = { type: 'number', minimum: 0 };
const str = { type: 'string', minLength: 1 };
const date = { type: 'string', pattern: '^\\d{4}-\\d{2}-\\d{2}$' };
const id = { type: 'string', pattern: '^[a-z0-9][a-z0-9._-]*$' };
const numbers = { type: 'array', items: num };
const obj = (properties: Record<string, unknown>, required: string[] = Object.keys(properties), closed = true) => ({
  type: 'object',
  properties,
  required,
  ...(closed ? { additionalProperties: false } : {}),
});

const material = obj({ formula: str, densityGcm3: pos });
const layer = obj({ name: str, material, thicknessUm: pos, kind: { enum: ['filter', 'surface'] } }, ['name', 'material', 'thicknessUm'], false);
const contaminationLaw = {
  oneOf: [
    obj({ kind: { const: 'linear' }, referenceDate: date, thicknessAtReferenceUm: nonNeg, rateUmPerYear: num }),
    obj({ kind: { const: 'exponential' }, startDate: date, initialUm: nonNeg, asymptoticUm: nonNeg, timescaleDays: pos }),
  ],
};
const stack = obj(
  {
    filters: { type: 'array', items: { $ref: '#/$defs/layer' } },
    contamination: { oneOf: [{ type: 'null' }, obj({ name: str, material, law: contaminationLaw }, ['name', 'material', 'law'], false)] },
    surface: { type: 'array', items: { $ref: '#/$defs/layer' } },
    sensor: obj(
      { material, depletionUm: pos, partial: { oneOf: [{ type: 'null' }, obj({ thicknessUm: pos, collectionAtSurface: { type: 'number', minimum: 0, maximum: 1 } })] } },
      ['material', 'depletionUm', 'partial'],
      false,
    ),
  },
  ['filters', 'contamination', 'surface', 'sensor'],
  false,
);
const lawOrLines = (law: Record<string, unknown>) => ({ oneOf: [obj({ source: { const: 'law' }, ...law }, undefined, false), obj({ source: { const: 'line-fits' } }, ['source'], false)] });
/** The tail may also come from the collection model of the sensor's partial layer (README "Response model and its checks"). */
const tailSpec = (law: Record<string, unknown>) => ({ oneOf: [...lawOrLines(law).oneOf, obj({ source: { const: 'collection' } }, ['source'], false)] });
const redistribution = obj(
  {
    pairEnergyEv: pos,
    thresholdKeV: nonNeg,
    fwhm: obj({ source: { enum: ['law', 'line-fits'] }, readNoiseE: nonNeg, fano: pos, sigma0Ev: nonNeg, pixelsPerEvent: obj({ a: num, bPerKeV: num }) }, undefined, false),
    centroid: lawOrLines({ gainError: num, offsetEv: num, chargeLossEv: nonNeg, chargeLossScaleKeV: pos }),
    tail: tailSpec({ fractionAtZero: nonNeg, fractionScaleKeV: pos, tailScaleEv: pos }),
    shelf: lawOrLines({ fraction: nonNeg }),
    escape: { type: 'boolean' },
    siFluorescenceFraction: nonNeg,
    siFluorescenceSource: { const: 'stack' },
    transferLoss: obj({ source: { const: 'law' }, lossPerTransfer: nonNeg, energyIndex: num, referenceKeV: pos }),
  },
  ['pairEnergyEv', 'thresholdKeV', 'fwhm', 'centroid', 'tail', 'shelf', 'escape', 'siFluorescenceFraction'],
  false,
);
const nullableNum = { type: ['number', 'null'] };
const lineFit = obj(
  {
    line: str,
    energyKeV: pos,
    centroidKeV: pos,
    centroidErrEv: pos,
    fwhmEv: pos,
    fwhmErrEv: pos,
    tailFraction: nonNeg,
    tailFractionErr: pos,
    tailScaleEv: pos,
    shelfFraction: nonNeg,
    efficiency: nullableNum,
    efficiencyErr: nullableNum,
    tailScaleErrEv: nullableNum,
    shelfFractionErr: nullableNum,
    region: id,
  },
  ['line', 'energyKeV', 'centroidKeV', 'centroidErrEv', 'fwhmEv', 'fwhmErrEv', 'tailFraction', 'tailFractionErr', 'tailScaleEv', 'shelfFraction', 'efficiency', 'efficiencyErr'],
);
const epoch = obj({ id, date, validFrom: date, validTo: { oneOf: [{ type: 'null' }, date] }, description: str }, ['id', 'date', 'validFrom', 'validTo']);
const transfers = { type: 'integer', minimum: 0 };
const regions = obj({
  transfers: { type: 'integer', minimum: 1 },
  nodes: { type: 'array', minItems: 1, items: obj({ id, name: str, redistribution: { $ref: '#/$defs/redistribution' } }) },
  rowBands: { type: 'array', minItems: 1, items: obj({ id, firstTransfer: transfers, lastTransfer: transfers }) },
});
const detector = obj(
  {
    id,
    name: str,
    kind: str,
    description: str,
    stack,
    redistribution: { $ref: '#/$defs/redistribution' },
    lineFits: { type: 'array', items: { $ref: '#/$defs/lineFit' } },
    lineFitsFile: str,
    epochs: { type: 'array', minItems: 1, items: epoch },
    bandLineFits: { type: 'array', items: { $ref: '#/$defs/lineFit' } },
    regions,
    configuration: obj({ id, filter: str, detector: id }),
  },
  ['id', 'name', 'kind', 'description', 'stack', 'redistribution', 'lineFits', 'lineFitsFile', 'epochs'],
  false,
);
const segment = obj({ eLoKeV: pos, eHiKeV: pos, photo: numbers, total: numbers });
const element = obj(
  {
    z: { type: 'integer', minimum: 1 },
    symbol: str,
    atomicWeight: pos,
    densityGcm3: nullableNum,
    kAlphaKeV: nullableNum,
    kAlpha2KeV: nullableNum,
    kFluorescenceYield: nullableNum,
    kJumpRatio: nullableNum,
    edges: { type: 'array', items: obj({ shell: str, edgeKeV: pos, tableEdgeKeV: nullableNum }) },
    segments: { type: 'array', minItems: 1, items: segment },
  },
  undefined,
  false,
);

export const MODEL_JSON_SCHEMA = {
  $schema: 'https://json-schema.org/draft/2020-12/schema',
  $id: 'kiln/model/1',
  title: 'Kiln model document: the resolved inputs of every product of a release',
  $defs: { layer, redistribution, lineFit },
  ...obj({
    schema: { const: 'kiln/model/1' },
    release: obj({
      id: str,
      date,
      validFrom: date,
      validTo: { oneOf: [{ type: 'null' }, date] },
      products: { type: 'array', minItems: 1, items: { enum: ['rmf', 'arf', 'rsp'] } },
      productsPer: { enum: ['detector', 'node', 'node-row'] },
    }),
    instrument: obj({
      id,
      telescope: str,
      instrument: str,
      channels: obj({ count: { type: 'integer', minimum: 1 }, firstChannel: { enum: [0, 1] }, widthEv: pos, originEv: nonNeg }),
      energyGrid: obj({ minKeV: pos, maxKeV: pos, bins: { type: 'integer', minimum: 1 }, spacing: { enum: ['linear', 'log'] } }),
      mirror: obj({ energyKeV: { type: 'array', minItems: 2, items: pos }, areaCm2: { type: 'array', minItems: 2, items: nonNeg } }),
    }),
    interaction: obj({ provenance: { type: 'object' }, energyMinKeV: pos, energyMaxKeV: pos, elements: { type: 'array', minItems: 1, items: element } }),
    detectors: { type: 'array', minItems: 1, items: detector },
  }),
} as const;
