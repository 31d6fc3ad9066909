// Type declarations for the parts of Vega's public runtime API that vega-typings leaves out.
export {};

declare module 'vega' {
  /** Text measurement switch of vega-scenegraph, re-exported by `vega`; `canvas(false)` forces the width estimate. */
  export const textMetrics: { canvas(useCanvas: boolean): void };
}
