// The report's sensitivity appendix: input ranges, each followed result by effect with its tornado chart, and the criteria that flip.
import type { ChartRecord } from '../execute/records.ts';
import { tornadoChart } from '../blocks/charts.ts';
import { formatQuantity, formatStated } from '../blocks/format.ts';
import type { CriterionEndOutcome, CriterionSensitivity, RangeEnd, SampledOutcome, SensitivityOutcome } from '../sensitivity/outcome.ts';
import type { StudySensitivity } from './studyRun.ts';
import { escapeHtml } from './escape.ts';

/** Small effects must show: the appendix writes figures to this many more significant digits than the study does. */
const EXTRA_DIGITS = 2;
const MAX_DIGITS = 15;

/** One tornado chart per followed result, drawn with the other charts of the run. */
export function sensitivityCharts(outcome: SensitivityOutcome): ChartRecord[] {
  return outcome.results.map((result) => ({
    kind: 'chart',
    caption: `Sensitivity of ${result.name}: its value with each input at the low and the high end of its range, largest effect first`,
    spec: tornadoChart({
      figure: result.name,
      unit: result.unit,
      asRun: result.asRun,
      bars: result.swings.map((swing) => ({ label: swing.input, low: swing.low, high: swing.high })),
    }),
  }));
}

function figure(value: number, unit: string, digits: number): string {
  return escapeHtml(formatQuantity(value, unit, Math.min(MAX_DIGITS, digits + EXTRA_DIGITS)));
}

function stated(quantity: { value: number; unit: string }): string {
  return escapeHtml(formatQuantity(formatStated(quantity.value, MAX_DIGITS), quantity.unit));
}

function outcomeCell(end: CriterionEndOutcome, unit: string, digits: number, flipped: boolean): string {
  return `<td class="${end.passed ? 'pass' : 'fail'}${flipped ? ' flipped' : ''}">${end.passed ? 'meets' : 'fails'} (${figure(end.value, unit, digits)})${flipped ? ' <strong>flips</strong>' : ''}</td>`;
}

function flipped(criterion: CriterionSensitivity, input: string, end: RangeEnd): boolean {
  return criterion.flips.some((flip) => flip.input === input && flip.end === end);
}

interface Numbering {
  table: number;
  figure: number;
}

function table(numbering: Numbering, caption: string, head: string[], rows: string[]): string {
  numbering.table += 1;
  return `<figure class="table"><figcaption><span class="label">Table ${numbering.table}</span> ${escapeHtml(caption)}</figcaption><table class="data"><thead><tr>${head.map((cell) => `<th>${cell}</th>`).join('')}</tr></thead><tbody>\n${rows.join('\n')}\n</tbody></table></figure>`;
}

/** The appendix; `svgs` are the tornado charts as drawn, in the order of `sensitivityCharts`. */
export function sensitivityAppendix(sensitivity: StudySensitivity, svgs: readonly string[], numbering: Numbering): string {
  const { outcome } = sensitivity;
  const parts = [
    `<p class="quiet">Each uncertain input the front matter names was moved to the low and then the high end of its range, one at a time, every other input as run, and the study was run again for each end: ${outcome.runs} runs beside the one this report shows. For each followed result the inputs are listed by their effect, the difference between the result at the two ends, largest first. Figures here carry ${EXTRA_DIGITS} more significant digits than in the body, so that small effects show.</p>`,
    table(
      numbering,
      'Ranges of the uncertain inputs',
      ['Input', 'As run', 'Range', 'Low end', 'High end'],
      outcome.inputs.map(
        (range) =>
          `<tr><td><code>${escapeHtml(range.input)}</code></td><td class="num">${stated(range.asRun)}</td><td>${escapeHtml(range.declared)}</td><td class="num">${stated(range.low)}</td><td class="num">${stated(range.high)}</td></tr>`,
      ),
    ),
  ];
  outcome.results.forEach((result, index) => {
    parts.push(`<h3>${escapeHtml(result.name)}</h3>`);
    parts.push(
      table(
        numbering,
        `${result.name} at the ends of each range (as run ${formatQuantity(result.asRun, result.unit, Math.min(MAX_DIGITS, result.digits + EXTRA_DIGITS))}), largest effect first`,
        ['Input', 'Input at its low end', 'Input at its high end', 'Effect'],
        result.swings.map(
          (swing) =>
            `<tr><td><code>${escapeHtml(swing.input)}</code></td><td class="num">${figure(swing.low, result.unit, result.digits)}</td><td class="num">${figure(swing.high, result.unit, result.digits)}</td><td class="num">${figure(swing.effect, result.unit, result.digits)}</td></tr>`,
        ),
      ),
    );
    numbering.figure += 1;
    parts.push(
      `<figure class="chart">${svgs[index] ?? ''}<figcaption><span class="label">Figure ${numbering.figure}</span> ${escapeHtml(sensitivity.charts[index]?.caption ?? '')}</figcaption></figure>`,
    );
  });
  if (outcome.criteria.length > 0) {
    parts.push('<h3>Criteria</h3>');
    parts.push(
      table(
        numbering,
        'Outcome of each followed criterion with each input at the ends of its range',
        ['Criterion', 'As run', 'Input', 'Input at its low end', 'Input at its high end'],
        outcome.criteria.flatMap((criterion) =>
          criterion.ends.map(
            (entry) =>
              `<tr><td>${escapeHtml(criterion.name)}</td>${outcomeCell(criterion.asRun, criterion.unit, criterion.digits, false)}<td><code>${escapeHtml(entry.input)}</code></td>${outcomeCell(entry.low, criterion.unit, criterion.digits, flipped(criterion, entry.input, 'low'))}${outcomeCell(entry.high, criterion.unit, criterion.digits, flipped(criterion, entry.input, 'high'))}</tr>`,
          ),
        ),
      ),
    );
  }
  if (outcome.sampled) parts.push(sampledSection(outcome.sampled, numbering));
  return parts.join('\n');
}

function sampledSection(sampled: SampledOutcome, numbering: Numbering): string {
  const parts = [
    '<h3>Sampled run</h3>',
    `<p class="quiet">${sampled.samples} samples from seed ${sampled.seed}: in each, every uncertain input above is drawn at once, independently and uniformly between the ends of its range, from one seeded xoroshiro128+ stream, so every run draws the same samples. A uniform draw within the ranges is an assumption, not knowledge of how the inputs are distributed; the spread shows what the ranges allow together.</p>`,
    table(
      numbering,
      `Spread of each followed result over the ${sampled.samples} samples`,
      ['Result', 'Mean', 'Standard deviation', 'Lowest', '5th percentile', '95th percentile', 'Highest'],
      sampled.results.map(
        (result) =>
          `<tr><td>${escapeHtml(result.name)}</td>${[
            result.mean,
            result.standardDeviation,
            result.min,
            result.percentile5,
            result.percentile95,
            result.max,
          ]
            .map((value) => `<td class="num">${figure(value, result.unit, result.digits)}</td>`)
            .join('')}</tr>`,
      ),
    ),
  ];
  if (sampled.criteria.length > 0) {
    parts.push(
      table(
        numbering,
        `Share of the ${sampled.samples} samples in which each followed criterion is met`,
        ['Criterion', 'Met in', 'Estimated probability met'],
        sampled.criteria.map(
          (criterion) =>
            `<tr><td>${escapeHtml(criterion.name)}</td><td class="num">${criterion.met} of ${sampled.samples}</td><td class="num">${escapeHtml(percent(criterion.probability))}</td></tr>`,
        ),
      ),
    );
  }
  return parts.join('\n');
}

function percent(share: number): string {
  return `${formatStated(share * 100, 3)} %`;
}

/** Under the criteria summary: each followed criterion whose outcome flips within the ranges, or that none does. */
export function flipsSummary(sensitivity: StudySensitivity, appendixHeading: string): string {
  const { criteria, inputs, sampled } = sensitivity.outcome;
  const share = (name: string) => {
    const entry = sampled?.criteria.find((candidate) => candidate.name === name);
    return entry && sampled ? `; met in ${escapeHtml(percent(entry.probability))} of ${sampled.samples} samples` : '';
  };
  if (criteria.length === 0) return '';
  const endText = (input: string, end: RangeEnd) => {
    const range = inputs.find((candidate) => candidate.input === input)!;
    return `${escapeHtml(input)} at its ${end} end (${stated(range[end])})`;
  };
  const flipping = criteria.filter((criterion) => criterion.flips.length > 0);
  if (flipping.length === 0) {
    return `<p class="sensitivity-flips steady">Within the ranges of ${escapeHtml(appendixHeading)}, no followed criterion changes its outcome.</p>`;
  }
  const items = flipping.map(
    (criterion) =>
      `<li><strong>${escapeHtml(criterion.name)}</strong> ${criterion.asRun.passed ? 'meets' : 'fails'} as run but ${criterion.asRun.passed ? 'fails' : 'meets'} with ${criterion.flips.map((flip) => endText(flip.input, flip.end)).join(', or with ')}${share(criterion.name)}</li>`,
  );
  return `<div class="sensitivity-flips"><p><strong>Outcome not settled within the uncertainty ranges</strong> (${escapeHtml(appendixHeading)}):</p><ul>\n${items.join('\n')}\n</ul></div>`;
}
