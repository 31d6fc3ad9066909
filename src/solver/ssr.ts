// Subsynchronous resonance screening: electrical resonance of a series-compensated path against turbine-generator torsional modes.
import { SolverDomainError, assertFiniteResult, requireArray, requireNumber, requireObject } from './errors.ts';
import { FREQUENCY_RANGE_HZ } from './lineModels.ts';

export interface SsrScreening {
  frequencyHz: number;
  /** f_er = f0 sqrt(Xc / X_total). */
  electricalResonanceHz: number;
  /** f0 - f_er: the rotor-side frequency that excites a torsional mode. */
  complementHz: number;
  marginHz: number;
  modes: Array<{ modeHz: number; separationHz: number; withinMargin: boolean }>;
  warnings: string[];
}

/**
 * Screens a series-compensated path: the electrical resonance f_er = f0 sqrt(Xc / X_total) appears on the rotor at f0 - f_er;
 * a torsional mode within the margin of that complement is flagged.
 */
export function ssrScreening(options: {
  frequencyHz: number;
  capacitorReactanceOhm: number;
  totalReactanceOhm: number;
  torsionalModesHz: number[];
  marginHz: number;
}): SsrScreening {
  const hint =
    'Pass { frequencyHz, capacitorReactanceOhm, totalReactanceOhm (generator + transformer + line + system, at f0), torsionalModesHz: [...], marginHz }.';
  const record = requireObject('options', options, hint);
  const frequencyHz = requireNumber('frequencyHz', record.frequencyHz, FREQUENCY_RANGE_HZ, hint);
  const totalReactanceOhm = requireNumber(
    'totalReactanceOhm',
    record.totalReactanceOhm,
    { min: 0, max: 1e6, minInclusive: false, unit: 'ohm' },
    hint,
  );
  const capacitorReactanceOhm = requireNumber(
    'capacitorReactanceOhm',
    record.capacitorReactanceOhm,
    { min: 0, max: totalReactanceOhm, minInclusive: false, maxInclusive: false, unit: 'ohm' },
    'The capacitor must cancel less than the total series reactance, or the path resonates at or above power frequency.',
  );
  const marginHz = requireNumber('marginHz', record.marginHz, { min: 0, max: frequencyHz, unit: 'Hz' }, hint);
  const modesHz = requireArray('torsionalModesHz', record.torsionalModesHz, 0, hint).map((mode, index) =>
    requireNumber(
      `torsionalModesHz[${index}]`,
      mode,
      { min: 0, max: frequencyHz, minInclusive: false, maxInclusive: false, unit: 'Hz' },
      'Torsional modes lie below power frequency.',
    ),
  );
  const electricalResonanceHz = frequencyHz * Math.sqrt(capacitorReactanceOhm / totalReactanceOhm);
  const complementHz = frequencyHz - electricalResonanceHz;
  if (!(complementHz > 0)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'capacitorReactanceOhm / totalReactanceOhm',
      value: capacitorReactanceOhm / totalReactanceOhm,
      allowedRange: '(0, 1)',
      hint: 'The resonance must lie below power frequency.',
    });
  }
  const modes = modesHz.map((modeHz) => {
    const separationHz = Math.abs(modeHz - complementHz);
    return { modeHz, separationHz, withinMargin: separationHz <= marginHz };
  });
  const warnings = modes
    .filter((mode) => mode.withinMargin)
    .map(
      (mode) =>
        `Torsional mode ${mode.modeHz.toFixed(2)} Hz lies ${mode.separationHz.toFixed(2)} Hz from the complement ${complementHz.toFixed(2)} Hz of the electrical resonance ${electricalResonanceHz.toFixed(2)} Hz (margin ${marginHz} Hz): detailed subsynchronous resonance study needed.`,
    );
  return assertFiniteResult('ssrScreening', { frequencyHz, electricalResonanceHz, complementHz, marginHz, modes, warnings });
}
