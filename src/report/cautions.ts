// The standing cautions every kvarbook report carries, in one catalogue so tests and templates check the same words.

export interface StandingCaution {
  id: string;
  text: string;
}

export const STANDING_CAUTIONS: readonly StandingCaution[] = [
  {
    id: 'engineering-judgment',
    text: 'This study supports, and does not replace, the judgment of a licensed professional engineer. Its figures are valid only for the inputs, methods and assumptions it states.',
  },
  {
    id: 'codes-govern',
    text: "Local codes and regulations, the applicable grid code and the utility's own standards govern wherever they differ from this study.",
  },
  {
    id: 'switching-hazard',
    text: "Switching and energisation of shunt reactors, shunt capacitors, static var compensators and series capacitor banks is hazardous: it can produce overvoltages, inrush and resonance. It is done only under the utility's switching procedures, by authorised persons.",
  },
  {
    id: 'protection-settings',
    text: 'Protection settings (line distance protection near series capacitors, capacitor bank unbalance and overload, varistor energy and bypass) are outside the steady-state methods of this study and need their own protection study.',
  },
  {
    id: 'steady-state-only',
    text: 'Results are balanced, positive-sequence, steady-state values at power frequency. Transients, harmonics, unbalance and subsynchronous interaction need time-domain or frequency-scan studies before equipment is specified.',
  },
];
