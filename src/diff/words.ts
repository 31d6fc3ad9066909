// How a revision diff's entries read, in the same words on the terminal and on the diff page.
import { formatNumber, formatQuantity, formatStated } from '../blocks/format.ts';
import type { ResultValue } from '../seal/compare.ts';
import type { BlockChange, CriterionState, DiffSide, InputState, ResultChange } from './revisionDiff.ts';

/** Figures are written in full enough to tell two close values apart: a moved figure may move in its tenth digit. */
const FIGURE_DIGITS = 12;

export function valueText(value: ResultValue, unit: string | null): string {
  return formatQuantity(typeof value === 'number' ? formatStated(value, FIGURE_DIGITS) : value, unit ?? '');
}

export function inputText(state: InputState | null): string {
  if (state === null) return 'none';
  const used = formatQuantity(formatStated(state.value, FIGURE_DIGITS), state.unit);
  if (state.source === 'overridden') return `${used} (overridden; the front matter gives ${state.given ?? 'no value'})`;
  return state.given !== null && state.given !== used ? `${state.given} (${used})` : used;
}

export function resultValueText(side: ResultChange['old']): string {
  return side === null ? 'none' : valueText(side.value, side.unit);
}

/** The change of a moved figure: signed difference and relative change, or why it is listed when there is none. */
export function resultChangeText(change: ResultChange): string {
  if (change.change !== 'moved') return change.change;
  if (change.difference !== null && change.relativeDifference !== null && change.reason === 'number-moved') {
    const sign = change.difference > 0 ? '+' : '';
    return `${sign}${formatQuantity(formatStated(change.difference), change.new?.unit ?? '')} (${formatNumber(change.relativeDifference * 100, 3)} %)`;
  }
  const reasons: Record<ResultChange['reason'] & string, string> = {
    'number-moved': 'moved',
    'unit-changed': 'unit changed',
    'kind-changed': 'kind of value changed',
    'text-or-flag-changed': 'changed',
    'not-finite': 'not a finite number',
  };
  return reasons[change.reason ?? 'number-moved'];
}

export function criterionText(state: CriterionState | null): string {
  if (state === null) return 'none';
  return `${state.passed ? 'meets' : 'FAILS'}: ${valueText(state.value, state.unit)} against ${state.limits}`;
}

export function blockTitle(change: BlockChange): string {
  const place = (side: BlockChange['old']) =>
    side === null ? '' : `block ${side.position} (study line ${side.fenceLine}${side.options.length > 0 ? `, ${side.options.join(' ')}` : ''})`;
  if (change.change === 'added') return `added ${place(change.new)}`;
  if (change.change === 'removed') return `removed ${place(change.old)}`;
  const moved = place(change.old) !== place(change.new);
  return `changed ${place(change.old)}${moved ? ` → ${place(change.new)}` : ''}`;
}

export function sideText(side: DiffSide): string {
  const seal = side.sealedBy === null ? 'not sealed' : `sealed by ${side.sealedBy}`;
  return `${side.report}: ${side.studyId} revision ${side.revision}, ${seal}; kvarbook ${side.kvarbookVersion}, Node.js ${side.nodeVersion}, lock file ${side.lockfileSha256.slice(0, 12)}`;
}
