// Valid studies the fuzzer damages: small, but touching every part of the format (front matter, inputs, blocks, inline values, charts).
import { studyText } from '../support/studies.ts';

const fence = (code: string, options = '') => `\`\`\`ts${options ? ` ${options}` : ''}\n${code}\n\`\`\``;

/** A compensated line on the invented Kestrel Ridge - Varnmouth route: solver, table, criterion, chart, inline values. */
export const compensatedLineStudy = studyText({
  frontMatter: 'limits: { blockSeconds: 5, studySeconds: 30, heapMb: 128 }',
  inputs: [
    '  nominalVoltage: { value: 400 kV, quantity: voltage, description: Nominal line-to-line voltage }',
    '  lineLength: { value: 320 km, quantity: length, min: 1 km, max: 1000 km, description: Route length }',
    '  reactorRating: { value: 120 Mvar, min: 0 Mvar, max: 500 Mvar }',
  ].join('\n'),
  body: [
    '# Line data',
    '',
    fence(
      [
        'const perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.028, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };',
        "const lengthKm = inputs.lineLength.in('km');",
        "const line = solver.lineModel({ ...perKm, lengthKm, label: 'Kestrel Ridge - Varnmouth' });",
        "const wave = solver.lineCharacteristics({ ...perKm, lengthKm, nominalVoltageKv: inputs.nominalVoltage.in('kV') });",
        "const chargingMvar = result('Line charging', wave.chargingMvar, { unit: 'Mvar', digits: 4 });",
      ].join('\n'),
    ),
    '',
    'The line charges {{ chargingMvar }} and is {{ figure(lengthKm, "km", 3) }} long.',
    '',
    '# Reactors',
    '',
    fence(
      [
        "const reactor = solver.shuntReactor({ qMvar: inputs.reactorRating.in('Mvar'), ratedVoltageKv: 400, label: 'reactor' });",
        "const route = solver.cascade({ elements: [reactor, line, reactor], label: 'compensated route' });",
        'const noLoad = solver.solveNoLoad({ network: route, sendingVoltageKv: 400 });',
        'const receivingPu = noLoad.receivingEnd.voltageKv / 400;',
        "result('Receiving-end voltage at no load', receivingPu, { unit: 'pu', digits: 4 });",
        "criterion('No-load receiving voltage', receivingPu, { min: 0.9, max: 1.1, unit: 'pu' });",
        "table([{ caseName: 'no load', vrPu: receivingPu }], { caption: 'Cases', columns: [{ key: 'caseName', label: 'Case' }, { key: 'vrPu', label: 'Vr', unit: 'pu', digits: 4 }] });",
      ].join('\n'),
    ),
    '',
    'At no load the far end sits at {{ figure(receivingPu, "pu", 4) }}.',
    '',
    fence(
      [
        "chart(charts.voltageProfileChart({ cases: [{ label: 'no load', points: [{ distanceKm: 0, voltagePu: 1 }, { distanceKm: lengthKm, voltagePu: receivingPu }] }], bandPu: { min: 0.95, max: 1.05 } }), { caption: 'Voltage along the line' });",
        "caution('Energise the reactors before the line.');",
      ].join('\n'),
      'hide-code',
    ),
    '',
  ].join('\n'),
});

/** The smallest runnable study: one input, one block, one inline value. */
export const minimalStudy = studyText({
  inputs: '  lineLength: 320 km',
  body: `${fence("const halfKm = inputs.lineLength.in('km') / 2;\nresult('Half length', halfKm, { unit: 'km' });")}\n\nHalf the route is {{ halfKm }} km.\n`,
});

export const SEED_STUDIES = [compensatedLineStudy, minimalStudy] as const;
