// A lossless line whose open-end voltage is 1/cos(βl), with its length and series reactance uncertain: the sensitivity tests' study.
import { studyText } from '../support/studies.ts';

export const SHUNT_SUSCEPTANCE_US_PER_KM = 3.9;
export const OPEN_END_LIMIT_PU = 1.068;

/** `sensitivity` replaces the front matter's sensitivity section (YAML lines, indented two spaces below `sensitivity:`). */
export function lineStudy(sensitivity = DEFAULT_SENSITIVITY): string {
  return studyText({
    frontMatter: `sensitivity:\n${sensitivity}`,
    inputs: [
      '  lineLength: { value: 320 km, min: 100 km, max: 500 km }',
      '  seriesReactance: { value: 0.32 ohm/km, min: 0.2 ohm/km, max: 0.5 ohm/km }',
    ].join('\n'),
    body: [
      '# Open line',
      '',
      '```ts',
      'const line = solver.lineModel({',
      '  lengthKm: inputs.lineLength.in("km"),',
      '  frequencyHz: 50,',
      '  seriesResistanceOhmPerKm: 0,',
      '  seriesReactanceOhmPerKm: inputs.seriesReactance.in("ohm/km"),',
      `  shuntSusceptanceUsPerKm: ${SHUNT_SUSCEPTANCE_US_PER_KM},`,
      '});',
      'const rise = 1 / Math.hypot(line.A.re, line.A.im);',
      'result("Open-end voltage", rise, { unit: "pu", digits: 5 });',
      'result("Line label", line.label);',
      `criterion("Open-end voltage limit", rise, { max: ${OPEN_END_LIMIT_PU}, unit: "pu" });`,
      '```',
      '',
    ].join('\n'),
  });
}

export const DEFAULT_SENSITIVITY = [
  '  inputs:',
  '    lineLength: { low: -1 %, high: +1 % }',
  '    seriesReactance: { low: 0.31 ohm/km, high: 0.33 ohm/km }',
  '  results: [Open-end voltage]',
  '  criteria: [Open-end voltage limit]',
].join('\n');
