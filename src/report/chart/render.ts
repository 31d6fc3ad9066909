// Turns a Vega-Lite spec into a deterministic, self-contained SVG string without a browser or network.
import { compile, type TopLevelSpec } from 'vega-lite';
import { parse, View, resetSVGDefIds, textMetrics, type Loader, type LoggerInterface, type Spec as VegaSpec } from 'vega';
import { expressionInterpreter } from 'vega-interpreter';
import { ChartSpecError, describeValue } from './errors.ts';
import { requireAllowedChartSpec } from './allowList.ts';
import { knownFieldTypes, knownMarks } from './vegaLiteNames.ts';

export { ChartSpecError } from './errors.ts';
import { chartBaseConfig } from './theme.ts';

export interface RenderChartOptions {
  /** Width of the plotting area in CSS pixels; overrides the spec's own `width`. */
  widthPx?: number;
  /** Height of the plotting area in CSS pixels; overrides the spec's own `height`. */
  heightPx?: number;
}

// Text widths decide label placement and therefore the SVG bytes. Vega measures with the optional
// `canvas` package when it happens to be installed, which would make the output depend on the
// machine's fonts; the built-in estimate depends on nothing, so it is pinned once here.
textMetrics.canvas(false);

/**
 * Renders a Vega-Lite spec to an SVG string.
 *
 * Data must be inline (`values` / `datasets`); any URL or file source is refused, and so is every feature outside
 * the allow-list of `allowList.ts` (expressions, generated data, links, images). The expressions Vega-Lite itself
 * writes for what remains (field predicates, scales) are evaluated by the AST interpreter of `vega-interpreter`
 * instead of Vega's default code generation, which would compile expression text into JavaScript with
 * `new Function`. In a run, this function is called inside a limited worker (see `src/pipeline.ts`).
 *
 * @throws ChartSpecError when the spec is malformed, uses external data, or Vega rejects it.
 */
export function renderChartSvg(spec: unknown, options: RenderChartOptions = {}): Promise<string> {
  // SVG clip-path and gradient ids come from counters global to Vega; renders are serialised and the
  // counters reset so that the same spec always yields the same ids.
  const result = renderQueue.then(() => renderNow(spec, options));
  renderQueue = result.then(
    () => undefined,
    () => undefined,
  );
  return result;
}

let renderQueue: Promise<void> = Promise.resolve();

async function renderNow(spec: unknown, options: RenderChartOptions): Promise<string> {
  const vegaLiteSpec = prepareSpec(spec, options);
  const vegaSpec = compileToVega(vegaLiteSpec);
  rejectExternalData(vegaSpec, '(compiled Vega spec)');

  const problems: string[] = [];
  let view: View;
  try {
    const runtime = parse(vegaSpec, undefined, { ast: true });
    view = new View(runtime, {
      renderer: 'none',
      expr: expressionInterpreter,
      loader: refusingLoader,
      logger: collectingLogger(problems),
      logLevel: 2,
    });
  } catch (error) {
    throw new ChartSpecError('chart-spec-invalid', 'Vega could not parse the compiled chart', {
      quantity: '(spec)',
      value: messageOf(error),
      allowed: 'a Vega-Lite spec whose expressions and encodings Vega accepts',
      hint: 'Check expression strings in calculate/filter transforms and params.',
    });
  }
  try {
    resetSVGDefIds();
    const svg = await view.toSVG();
    if (problems.length > 0) {
      throw new ChartSpecError('chart-render-failed', 'Vega reported problems while rendering the chart', {
        quantity: '(spec)',
        value: problems.join(' | '),
        allowed: 'a spec that renders without Vega errors or warnings',
        hint: 'Fix the fields, expressions or data named in the message.',
      });
    }
    return svg;
  } catch (error) {
    if (error instanceof ChartSpecError) throw error;
    throw new ChartSpecError('chart-render-failed', 'Vega failed while rendering the chart', {
      quantity: '(spec)',
      value: messageOf(error),
      allowed: 'a spec that renders without Vega errors',
      hint: 'Fix the fields, expressions or data named in the message.',
    });
  } finally {
    view.finalize();
  }
}

function prepareSpec(spec: unknown, options: RenderChartOptions): Record<string, unknown> {
  if (spec === null || typeof spec !== 'object' || Array.isArray(spec)) {
    throw new ChartSpecError('chart-spec-not-object', 'A chart spec must be a Vega-Lite object', {
      quantity: '(spec)',
      value: describeValue(spec),
      allowed: 'a plain object such as { data, mark, encoding }',
      hint: 'Pass the spec object itself, not a JSON string or an array.',
    });
  }
  let copy: Record<string, unknown>;
  try {
    // A JSON round trip both isolates us from later mutation and drops functions or class instances
    // that a spec coming from study code might smuggle in.
    copy = JSON.parse(JSON.stringify(spec)) as Record<string, unknown>;
  } catch (error) {
    throw new ChartSpecError('chart-spec-invalid', 'A chart spec must be plain JSON data', {
      quantity: '(spec)',
      value: messageOf(error),
      allowed: 'JSON-serialisable objects, arrays, strings, numbers, booleans and null',
      hint: 'Remove cyclic references, BigInt values and the like from the spec.',
    });
  }
  rejectExternalData(copy, '');
  rejectUnknownMarksAndTypes(copy, '');
  requireAllowedChartSpec(copy);
  for (const [key, value] of [
    ['width', options.widthPx],
    ['height', options.heightPx],
  ] as const) {
    if (value === undefined) continue;
    if (!Number.isFinite(value) || value <= 0) {
      throw new ChartSpecError('chart-spec-invalid', `The requested chart ${key} is not a positive number`, {
        quantity: `options.${key}Px`,
        value: describeValue(value),
        allowed: 'a finite number of pixels greater than 0',
        hint: `Pass ${key}Px like 480, or leave it out to use the spec's own size.`,
      });
    }
    copy[key] = value;
  }
  return copy;
}

function compileToVega(vegaLiteSpec: Record<string, unknown>): VegaSpec {
  const warnings: string[] = [];
  let compiled: VegaSpec;
  try {
    compiled = compile(vegaLiteSpec as unknown as TopLevelSpec, {
      config: chartBaseConfig,
      logger: collectingLogger(warnings),
    }).spec;
  } catch (error) {
    throw new ChartSpecError('chart-spec-invalid', 'Vega-Lite rejected the chart spec', {
      quantity: '(spec)',
      value: messageOf(error),
      allowed: 'a Vega-Lite spec with a mark (or layer/concat/facet) and valid encodings',
      hint: 'Compare the spec with the Vega-Lite documentation for the named property.',
    });
  }
  if (warnings.length > 0) {
    // Vega-Lite silently drops what it cannot use and only warns; in a sealed report a silently
    // dropped encoding would misstate the result, so warnings are treated as errors.
    throw new ChartSpecError('chart-spec-invalid', 'Vega-Lite could not use part of the chart spec', {
      quantity: '(spec)',
      value: warnings.join(' | '),
      allowed: 'a spec that Vega-Lite compiles without warnings',
      hint: 'Fix or remove the property named in the message.',
    });
  }
  return compiled;
}

// Vega-Lite fails on an unknown mark or field type with an internal TypeError that does not say where
// the problem is, so these two common slips are checked first (against `vegaLiteNames.ts`).
function rejectUnknownMarksAndTypes(node: unknown, path: string): void {
  if (Array.isArray(node)) {
    node.forEach((child, index) => rejectUnknownMarksAndTypes(child, joinPath(path, String(index))));
    return;
  }
  if (node === null || typeof node !== 'object') return;
  const record = node as Record<string, unknown>;
  if ('mark' in record) {
    const mark = record.mark;
    const markType = mark !== null && typeof mark === 'object' ? (mark as Record<string, unknown>).type : mark;
    const markPath = joinPath(path, typeof mark === 'object' ? 'mark.type' : 'mark');
    if (typeof markType !== 'string' || !knownMarks.has(markType)) {
      throw new ChartSpecError('chart-spec-invalid', 'Unknown mark type', {
        quantity: markPath,
        value: describeValue(markType),
        allowed: [...knownMarks].join(', '),
        hint: 'Use one of the listed mark types, e.g. "line" or "point".',
      });
    }
  }
  const encoding = record.encoding;
  if (encoding !== null && typeof encoding === 'object' && !Array.isArray(encoding)) {
    for (const [channel, definitions] of Object.entries(encoding)) {
      for (const [definition, definitionPath] of objectsAt(definitions, joinPath(path, `encoding.${channel}`))) {
        if ('type' in definition && (typeof definition.type !== 'string' || !knownFieldTypes.has(definition.type))) {
          throw new ChartSpecError('chart-spec-invalid', 'Unknown field type in an encoding', {
            quantity: `${definitionPath}.type`,
            value: describeValue(definition.type),
            allowed: [...knownFieldTypes].join(', '),
            hint: 'Numbers such as voltages and distances are "quantitative"; case names are "nominal".',
          });
        }
      }
    }
  }
  for (const [key, child] of Object.entries(record)) {
    if (key === 'data' || key === 'datasets') continue;
    rejectUnknownMarksAndTypes(child, joinPath(path, key));
  }
}

/** Walks the spec and refuses every data source that is not inline. */
function rejectExternalData(node: unknown, path: string): void {
  if (Array.isArray(node)) {
    node.forEach((child, index) => rejectExternalData(child, joinPath(path, String(index))));
    return;
  }
  if (node === null || typeof node !== 'object') return;
  for (const [key, child] of Object.entries(node)) {
    const childPath = joinPath(path, key);
    if (key === 'data') {
      for (const [source, sourcePath] of objectsAt(child, childPath)) {
        if ('url' in source) {
          throw new ChartSpecError('chart-data-not-inline', 'Chart data must be inline, not loaded from a URL or file', {
            quantity: `${sourcePath}.url`,
            value: describeValue(source.url),
            allowed: 'inline data: { values: [...] } or a named dataset in top-level "datasets"',
            hint: 'Compute the data in the calculation block and pass it as values; reports never fetch anything.',
          });
        }
      }
    }
    rejectExternalData(child, childPath);
  }
}

/** Objects directly at `node` (itself, or the elements of an array). */
function objectsAt(node: unknown, path: string): Array<[Record<string, unknown>, string]> {
  if (Array.isArray(node)) {
    return node.flatMap((child, index) => objectsAt(child, joinPath(path, String(index))));
  }
  return node !== null && typeof node === 'object' ? [[node as Record<string, unknown>, path]] : [];
}

function joinPath(path: string, key: string): string {
  return path === '' ? key : `${path}.${key}`;
}

function refusal(what: string): Promise<never> {
  return Promise.reject(
    new ChartSpecError('chart-data-not-inline', 'Charts may not load anything from outside the spec', {
      quantity: 'loader',
      value: describeValue(what),
      allowed: 'inline data values only',
      hint: 'Put the data into the spec as values.',
    }),
  );
}

// Defence in depth behind rejectExternalData: whatever still asks Vega to load a resource (data,
// images) gets an error instead of a network or file access.
const refusingLoader: Loader = {
  load: (uri) => refusal(uri),
  sanitize: (uri) => refusal(uri),
  http: (uri) => refusal(uri),
  file: (fileName) => refusal(fileName),
};

function collectingLogger(sink: string[]): LoggerInterface {
  let level = 2;
  const logger: LoggerInterface = {
    level(next?: number) {
      if (next === undefined) return level;
      level = next;
      return logger;
    },
    error(...args: unknown[]) {
      sink.push(args.map(messageOf).join(' '));
      return logger;
    },
    warn(...args: unknown[]) {
      sink.push(args.map(messageOf).join(' '));
      return logger;
    },
    info() {
      return logger;
    },
    debug() {
      return logger;
    },
  };
  return logger;
}

function messageOf(value: unknown): string {
  return value instanceof Error ? value.message : String(value);
}
