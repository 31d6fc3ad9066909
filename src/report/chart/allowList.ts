// The Vega-Lite features a report chart may use: what the chart builders need and plain hand-written charts share; the rest is refused by path.
import { ChartSpecError, describeValue } from './errors.ts';

/**
 * A spec comes from study code and is drawn in the host, so only features that cannot run work of their own are
 * allowed: inline rows, marks, encodings of fields, field predicates. Expressions (calculate, string filters,
 * labelExpr, signals, params), generated data (sequence), reshaping transforms (flatten, fold), links (href, url),
 * images and projections are outside the list. Sizes are bounded so that a spec cannot ask for unbounded work.
 */
type Rule =
  | { kind: 'number'; min: number; max: number; integer?: boolean }
  | { kind: 'string'; maxLength: number; pattern?: RegExp; describe?: string }
  | { kind: 'choice'; values: readonly (string | number | boolean | null)[] }
  | { kind: 'boolean' }
  | { kind: 'null' }
  | { kind: 'array'; of: Rule; maxItems: number }
  | { kind: 'object'; fields: () => Readonly<Record<string, Rule>>; what: string }
  | { kind: 'rows'; maxItems: number }
  | { kind: 'map'; of: Rule; maxKeys: number; what: string }
  | { kind: 'either'; rules: readonly Rule[] };

/** How many data rows one chart may carry in all, and how many fields a row may have. */
const MAX_CHART_ROWS = 20_000;
const MAX_ROW_FIELDS = 64;
const MAX_TEXT = 2_000;

const num = (min: number, max: number, integer = false): Rule => ({ kind: 'number', min, max, integer });
const text = (maxLength = MAX_TEXT): Rule => ({ kind: 'string', maxLength });
const choice = (...values: (string | number | boolean | null)[]): Rule => ({ kind: 'choice', values });
const bool: Rule = { kind: 'boolean' };
const nothing: Rule = { kind: 'null' };
const list = (of: Rule, maxItems: number): Rule => ({ kind: 'array', of, maxItems });
const either = (...rules: Rule[]): Rule => ({ kind: 'either', rules });
const object = (what: string, fields: () => Readonly<Record<string, Rule>>): Rule => ({ kind: 'object', what, fields });
const scalar = either(num(-Number.MAX_VALUE, Number.MAX_VALUE), text(), bool, nothing);

/** A CSS colour the SVG writes into an attribute: a name, a hex code or rgb()/hsl() numbers, never url(…). */
const colour: Rule = {
  kind: 'string',
  maxLength: 40,
  pattern: /^(#[0-9a-fA-F]{3,8}|[a-zA-Z]{1,30}|(rgb|rgba|hsl|hsla)\(\s*[-0-9.%\s,/]+\))$/,
  describe: 'a colour name, #rrggbb, rgb(…) or hsl(…)',
};
const font: Rule = { kind: 'string', maxLength: 200, pattern: /^[A-Za-z0-9 ,"'-]+$/, describe: 'font family names' };
const pixels = num(-10_000, 10_000);
const fontSize = num(1, 200);
const dash = list(num(0, 1_000), 16);
const SYMBOLS = [
  'circle',
  'square',
  'cross',
  'diamond',
  'triangle-up',
  'triangle-down',
  'triangle-right',
  'triangle-left',
  'triangle',
  'stroke',
  'wedge',
  'arrow',
];
const symbol = choice(...SYMBOLS);
const fontWeight = either(choice('normal', 'bold', 'lighter', 'bolder'), num(100, 900));
const title = either(text(), list(text(), 10), nothing);
const anchor = choice('start', 'middle', 'end');

const MARK_TYPES = ['area', 'bar', 'circle', 'line', 'point', 'rect', 'rule', 'square', 'text', 'tick', 'trail'];
const FIELD_TYPES = ['quantitative', 'ordinal', 'nominal'];
const AGGREGATES = ['count', 'sum', 'mean', 'average', 'median', 'min', 'max', 'distinct', 'stdev', 'variance', 'q1', 'q3'];

/** Mark properties, shared by the mark of a spec and the mark defaults of its config. */
const markStyle = (): Record<string, Rule> => ({
  color: colour,
  fill: colour,
  stroke: colour,
  opacity: num(0, 1),
  fillOpacity: num(0, 1),
  strokeOpacity: num(0, 1),
  strokeWidth: num(0, 100),
  strokeDash: dash,
  strokeCap: choice('butt', 'round', 'square'),
  strokeJoin: choice('miter', 'round', 'bevel'),
  size: num(0, 100_000),
  shape: symbol,
  filled: bool,
  interpolate: choice('linear', 'step', 'step-before', 'step-after', 'monotone', 'basis', 'cardinal', 'natural'),
  clip: bool,
  align: choice('left', 'center', 'right'),
  baseline: choice('top', 'middle', 'bottom', 'alphabetic', 'line-top', 'line-bottom'),
  dx: pixels,
  dy: pixels,
  font,
  fontSize,
  fontWeight,
  fontStyle: choice('normal', 'italic'),
  angle: num(-360, 360),
  orient: choice('vertical', 'horizontal'),
  thickness: num(0, 1_000),
  cornerRadius: num(0, 1_000),
  limit: num(0, 10_000),
});

const markRule: Rule = either(
  choice(...MARK_TYPES),
  object('a mark', () => ({
    type: choice(...MARK_TYPES),
    ...markStyle(),
    point: bool,
    text: text(),
    x: either(pixels, choice('width')),
    y: either(pixels, choice('height')),
    x2: either(pixels, choice('width')),
    y2: either(pixels, choice('height')),
    width: num(0, 10_000),
    height: num(0, 10_000),
  })),
);

const scaleRule: Rule = either(
  nothing,
  object('a scale', () => ({
    type: choice('linear', 'log', 'pow', 'sqrt', 'symlog', 'ordinal', 'point', 'band'),
    zero: bool,
    domain: list(scalar, 1_000),
    domainMin: num(-Number.MAX_VALUE, Number.MAX_VALUE),
    domainMax: num(-Number.MAX_VALUE, Number.MAX_VALUE),
    range: list(either(scalar, dash), 1_000),
    nice: either(bool, num(1, 100, true)),
    padding: num(0, 1_000),
    paddingInner: num(0, 1),
    paddingOuter: num(0, 1_000),
    reverse: bool,
    clamp: bool,
    exponent: num(-100, 100),
    base: num(1.0001, 1_000),
  })),
);

const axisStyle = (): Record<string, Rule> => ({
  labelFontSize: fontSize,
  titleFontSize: fontSize,
  titleFontWeight: fontWeight,
  labelColor: colour,
  titleColor: colour,
  domainColor: colour,
  tickColor: colour,
  gridColor: colour,
  gridDash: dash,
  labelAngle: num(-360, 360),
  labelLimit: num(0, 10_000),
  labelPadding: pixels,
  titlePadding: pixels,
  labelOverlap: either(bool, choice('parity', 'greedy')),
  labelFlush: either(bool, num(0, 1_000)),
  grid: bool,
  labels: bool,
  ticks: bool,
  domain: bool,
  tickCount: num(0, 100, true),
  tickMinStep: num(0, Number.MAX_VALUE),
  offset: pixels,
  minExtent: num(0, 10_000),
  maxExtent: num(0, 10_000),
});

const axisRule: Rule = either(
  nothing,
  object('an axis', () => ({
    ...axisStyle(),
    title,
    format: text(64),
    orient: choice('top', 'bottom', 'left', 'right'),
    values: list(scalar, 1_000),
  })),
);

const legendStyle = (): Record<string, Rule> => ({
  orient: choice('left', 'right', 'top', 'bottom', 'top-left', 'top-right', 'bottom-left', 'bottom-right', 'none'),
  direction: choice('horizontal', 'vertical'),
  columns: num(0, 20, true),
  labelLimit: num(0, 10_000),
  labelFontSize: fontSize,
  titleFontSize: fontSize,
  symbolType: symbol,
  symbolStrokeWidth: num(0, 100),
  symbolSize: num(0, 10_000),
  offset: pixels,
  padding: pixels,
});

const legendRule: Rule = either(
  nothing,
  object('a legend', () => ({ ...legendStyle(), title, format: text(64), values: list(scalar, 1_000) })),
);

const channelRule: Rule = object('an encoding channel', () => ({
  field: text(200),
  type: choice(...FIELD_TYPES),
  title,
  scale: scaleRule,
  axis: axisRule,
  legend: legendRule,
  value: either(scalar, dash),
  datum: scalar,
  aggregate: choice(...AGGREGATES),
  bin: either(
    bool,
    object('a bin', () => ({
      maxbins: num(2, 200, true),
      step: num(Number.MIN_VALUE, Number.MAX_VALUE),
      extent: list(num(-Number.MAX_VALUE, Number.MAX_VALUE), 2),
      nice: bool,
    })),
  ),
  sort: either(choice('ascending', 'descending', null), list(scalar, 1_000)),
  stack: either(bool, choice('zero', 'normalize', 'center', null)),
  format: text(64),
}));

const CHANNELS = [
  'x',
  'y',
  'x2',
  'y2',
  'color',
  'fill',
  'stroke',
  'opacity',
  'fillOpacity',
  'strokeOpacity',
  'strokeWidth',
  'strokeDash',
  'size',
  'shape',
  'order',
  'detail',
  'text',
];
const encodingRule: Rule = object('an encoding', () =>
  Object.fromEntries(CHANNELS.map((channel) => [channel, either(channelRule, list(channelRule, 16))])),
);

const predicateRule: Rule = object('a field predicate', () => ({
  field: text(200),
  equal: scalar,
  lt: scalar,
  lte: scalar,
  gt: scalar,
  gte: scalar,
  range: list(either(num(-Number.MAX_VALUE, Number.MAX_VALUE), nothing), 2),
  oneOf: list(scalar, 1_000),
  valid: bool,
  and: list(predicateRule, 32),
  or: list(predicateRule, 32),
  not: predicateRule,
}));

const transformRule: Rule = list(
  object('a transform', () => ({ filter: predicateRule })),
  32,
);

const dataRule: Rule = object('inline data', () => ({ values: { kind: 'rows', maxItems: MAX_CHART_ROWS }, name: text(200) }));

const titleRule: Rule = either(
  text(),
  object('a title', () => ({
    text: either(text(), list(text(), 10)),
    subtitle: either(text(), list(text(), 10)),
    anchor,
    fontSize,
    subtitleFontSize: fontSize,
    fontWeight,
    color: colour,
    subtitleColor: colour,
    offset: pixels,
    font,
  })),
);

const resolution = choice('shared', 'independent');
const resolveRule: Rule = object('a resolve', () =>
  Object.fromEntries(
    ['scale', 'axis', 'legend'].map((part) => [
      part,
      object(`a ${part} resolve`, () => Object.fromEntries(CHANNELS.map((channel) => [channel, resolution]))),
    ]),
  ),
);

/** Fields every view may have; the top level adds config, datasets and the page properties. */
const viewFields = (): Record<string, Rule> => ({
  title: titleRule,
  description: text(),
  name: text(200),
  width: num(1, 4_000),
  height: num(1, 4_000),
  data: dataRule,
  mark: markRule,
  encoding: encodingRule,
  transform: transformRule,
  layer: list(viewRule, 64),
  hconcat: list(viewRule, 16),
  vconcat: list(viewRule, 16),
  resolve: resolveRule,
});
const viewRule: Rule = object('a view', viewFields);

const configRule: Rule = object('a config', () => ({
  font,
  background: colour,
  padding: num(0, 1_000),
  view: object('a view config', () => ({
    stroke: either(colour, nothing),
    strokeWidth: num(0, 100),
    fill: either(colour, nothing),
    continuousWidth: num(1, 4_000),
    continuousHeight: num(1, 4_000),
  })),
  title: object('a title config', () => ({
    anchor,
    fontSize,
    subtitleFontSize: fontSize,
    fontWeight,
    color: colour,
    subtitleColor: colour,
    offset: pixels,
    font,
  })),
  axis: object('an axis config', axisStyle),
  axisX: object('an axis config', axisStyle),
  axisY: object('an axis config', axisStyle),
  legend: object('a legend config', legendStyle),
  range: object('a range config', () => ({ category: list(colour, 64), ordinal: list(colour, 64) })),
  ...Object.fromEntries(['mark', ...MARK_TYPES].map((mark) => [mark, object(`a ${mark} config`, markStyle)])),
}));

const topRule: Rule = object('a chart', () => ({
  ...viewFields(),
  $schema: text(200),
  config: configRule,
  datasets: { kind: 'map', of: { kind: 'rows', maxItems: MAX_CHART_ROWS }, maxKeys: 64, what: 'named datasets' },
  padding: num(0, 1_000),
  background: colour,
  autosize: choice('pad', 'fit', 'none'),
}));

const HINT = 'Report charts use inline rows, marks, encodings of fields and field filters; compute anything else in the calculation block.';

function refuse(path: string, value: unknown, allowed: string, problem = 'The chart uses a Vega-Lite feature reports do not draw'): never {
  throw new ChartSpecError('chart-spec-not-allowed', problem, { quantity: path || '(spec)', value: describeValue(value), allowed, hint: HINT });
}

const typeName = (value: unknown) => (value === null ? 'null' : Array.isArray(value) ? 'array' : typeof value);

/** The kinds of value a rule takes, for an error message. */
function describeRule(rule: Rule): string {
  switch (rule.kind) {
    case 'number':
      return `a ${rule.integer ? 'whole ' : ''}number from ${rule.min === -Number.MAX_VALUE ? '-∞' : rule.min} to ${rule.max === Number.MAX_VALUE ? '+∞' : rule.max}`;
    case 'string':
      return rule.describe ?? `text of at most ${rule.maxLength} characters`;
    case 'choice':
      return `one of ${rule.values.map((value) => JSON.stringify(value)).join(', ')}`;
    case 'boolean':
      return 'true or false';
    case 'null':
      return 'null';
    case 'array':
      return `a list of at most ${rule.maxItems}`;
    case 'object':
      return rule.what;
    case 'rows':
      return `a list of at most ${rule.maxItems} rows of plain values`;
    case 'map':
      return rule.what;
    case 'either':
      return rule.rules.map(describeRule).join(', or ');
  }
}

/** Whether a value is of the JavaScript type a rule takes (the first step of choosing among alternatives). */
function sameType(rule: Rule, value: unknown): boolean {
  switch (rule.kind) {
    case 'number':
      return typeof value === 'number';
    case 'string':
      return typeof value === 'string';
    case 'choice':
      return rule.values.some((allowed) => typeName(allowed) === typeName(value));
    case 'boolean':
      return typeof value === 'boolean';
    case 'null':
      return value === null;
    case 'array':
    case 'rows':
      return Array.isArray(value);
    case 'object':
    case 'map':
      return typeName(value) === 'object';
    case 'either':
      return rule.rules.some((inner) => sameType(inner, value));
  }
}

interface Budget {
  rows: number;
}

function check(rule: Rule, value: unknown, path: string, budget: Budget): void {
  switch (rule.kind) {
    case 'number':
      if (typeof value !== 'number' || !Number.isFinite(value) || value < rule.min || value > rule.max || (rule.integer && !Number.isInteger(value)))
        refuse(path, value, describeRule(rule));
      return;
    case 'string':
      if (typeof value !== 'string' || value.length > rule.maxLength || (rule.pattern && !rule.pattern.test(value)))
        refuse(path, value, describeRule(rule));
      return;
    case 'choice':
      if (!rule.values.includes(value as string)) refuse(path, value, describeRule(rule));
      return;
    case 'boolean':
      if (typeof value !== 'boolean') refuse(path, value, describeRule(rule));
      return;
    case 'null':
      if (value !== null) refuse(path, value, 'null');
      return;
    case 'array':
      if (!Array.isArray(value) || value.length > rule.maxItems)
        refuse(path, Array.isArray(value) ? `${value.length} items` : value, describeRule(rule));
      value.forEach((item, index) => check(rule.of, item, join(path, String(index)), budget));
      return;
    case 'rows':
      if (!Array.isArray(value)) refuse(path, value, describeRule(rule));
      budget.rows += value.length;
      if (value.length > rule.maxItems || budget.rows > MAX_CHART_ROWS) {
        refuse(
          path,
          `${budget.rows} rows`,
          `at most ${MAX_CHART_ROWS} data rows in one chart`,
          'The chart carries more data than a report chart draws',
        );
      }
      value.forEach((row, index) => checkRow(row, path, index));
      return;
    case 'map': {
      if (typeName(value) !== 'object') refuse(path, value, rule.what);
      const entries = Object.entries(value as Record<string, unknown>);
      if (entries.length > rule.maxKeys) refuse(path, `${entries.length} entries`, `at most ${rule.maxKeys}`);
      for (const [key, item] of entries) check(rule.of, item, join(path, key), budget);
      return;
    }
    case 'object': {
      if (typeName(value) !== 'object') refuse(path, value, rule.what);
      const fields = rule.fields();
      for (const [key, item] of Object.entries(value as Record<string, unknown>)) {
        const field = Object.hasOwn(fields, key) ? fields[key] : undefined;
        if (!field) refuse(join(path, key), item, `in ${rule.what}: ${Object.keys(fields).join(', ')}`);
        check(field, item, join(path, key), budget);
      }
      return;
    }
    case 'either': {
      const candidates = rule.rules.filter((inner) => sameType(inner, value));
      if (candidates.length === 0) refuse(path, value, describeRule(rule));
      // Alternatives of one type are tried in order; the last one's complaint is the most specific.
      for (const [index, candidate] of candidates.entries()) {
        try {
          check(candidate, value, path, budget);
          return;
        } catch (error) {
          if (index === candidates.length - 1) throw error;
        }
      }
    }
  }
}

/** Whether a value is one `scalar` takes, decided without building its path: this runs once per data point. */
function plainScalar(value: unknown): boolean {
  return (
    (typeof value === 'number' && Number.isFinite(value)) ||
    (typeof value === 'string' && value.length <= MAX_TEXT) ||
    typeof value === 'boolean' ||
    value === null
  );
}

/** A data row (the `index`th of the rows at `rowsPath`): a plain value, or one level of named plain values. */
function checkRow(row: unknown, rowsPath: string, index: number): void {
  if (typeName(row) !== 'object') {
    if (!plainScalar(row)) check(scalar, row, join(rowsPath, String(index)), { rows: 0 });
    return;
  }
  const fields = Object.entries(row as Record<string, unknown>);
  if (fields.length > MAX_ROW_FIELDS) refuse(join(rowsPath, String(index)), `${fields.length} fields`, `at most ${MAX_ROW_FIELDS} fields in a row`);
  for (const [key, item] of fields) {
    if (key.length > 200) refuse(join(join(rowsPath, String(index)), key.slice(0, 40)), key, 'field names of at most 200 characters');
    if (!plainScalar(item)) check(scalar, item, join(join(rowsPath, String(index)), key), { rows: 0 });
  }
}

function join(path: string, key: string): string {
  return path === '' ? key : `${path}.${key}`;
}

/** Throws ChartSpecError (CHART_SPEC_NOT_ALLOWED) at the first feature of `spec` outside the allow-list. */
export function requireAllowedChartSpec(spec: unknown): void {
  check(topRule, spec, '', { rows: 0 });
}
