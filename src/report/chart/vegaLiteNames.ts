// Vega-Lite's mark and field-type names, from the enums of its own JSON schema, so that they always match the installed version.
import vegaLiteSchema from 'vega-lite/vega-lite-schema.json' with { type: 'json' };

/**
 * The schema's definitions read here. The schema is almost 2 MB; the build bundles only these into the chart worker
 * (`scripts/build.ts`), which then starts faster and holds less.
 */
export const SCHEMA_DEFINITIONS_READ = ['Mark', 'BoxPlot', 'ErrorBar', 'ErrorBand', 'Type'] as const;

const { definitions } = vegaLiteSchema;

export const knownMarks = new Set<string>([
  ...definitions.Mark.enum,
  definitions.BoxPlot.const,
  definitions.ErrorBar.const,
  definitions.ErrorBand.const,
]);
export const knownFieldTypes = new Set<string>(definitions.Type.enum);
