/**
 * Messages between the extension host and the results panel's webview. Both sides import this file,
 * so a message that one side sends and the other does not understand is a compile error.
 * Everything here is plain JSON: it crosses `postMessage` and is stored by the panel serializer.
 */
import type { Result } from './stats/result';

/** One point of a plot, in data units (the webview maps them to pixels). */
export interface PlotPoint {
  readonly x: number;
  readonly y: number;
}

/** Density of the reference distribution with the observed statistic and the tested tail shaded. */
export interface DensityPlot {
  readonly kind: 'density';
  readonly title: string;
  readonly xLabel: string;
  readonly xMin: number;
  readonly xMax: number;
  readonly yMax: number;
  /** The density curve, left to right. */
  readonly curve: readonly PlotPoint[];
  /** Closed polygons (each starts and ends on y = 0) covering the tail(s) the p-value counts. */
  readonly shaded: readonly (readonly PlotPoint[])[];
  /**
   * The observed statistic (or the x looked up), clamped into [xMin, xMax]; `clipped` when the real value
   * lies outside the axis. Null for a lookup of critical values only.
   */
  readonly observed: { readonly x: number; readonly label: string; readonly clipped: boolean } | null;
  /** Critical value(s) at α, for a dashed marker. */
  readonly critical: readonly number[];
  readonly ticks: readonly number[];
  /** The text under each tick, formatted by the host (same length as `ticks`). */
  readonly tickLabels: readonly string[];
}

/**
 * Goodness of fit as deviations: one row per category, a stem from the expectation (0) to observed − expected,
 * over a band of ±1.96 standard deviations of that deviation under the hypothesis (|std. residual| < 1.96
 * inside it). Rows in the order of the categories.
 */
export interface DeviationPlot {
  readonly kind: 'deviation';
  readonly title: string;
  readonly xLabel: string;
  readonly xMin: number;
  readonly xMax: number;
  readonly ticks: readonly number[];
  readonly tickLabels: readonly string[];
  readonly rows: readonly {
    readonly label: string;
    /** observed − expected, in counts. */
    readonly deviation: number;
    /** Half-width of the band, in counts: 1.96 × the deviation's standard deviation. */
    readonly band: number;
    readonly residual: number;
    readonly shade: ResidualShade;
    /** Host-formatted "+12.5 (z = +2.31)", and observed / expected for the description. */
    readonly text: string;
    readonly observedText: string;
    readonly expectedText: string;
  }[];
}

/** Power against sample size, with the plan's n marked. */
export interface PowerCurvePlot {
  readonly kind: 'power-curve';
  readonly title: string;
  readonly xLabel: string;
  readonly xMin: number;
  readonly xMax: number;
  readonly curve: readonly PlotPoint[];
  readonly ticks: readonly number[];
  readonly tickLabels: readonly string[];
  readonly yTicks: readonly number[];
  readonly yTickLabels: readonly string[];
  readonly marker: { readonly x: number; readonly y: number; readonly label: string };
}

/** Shading level of one cell: the sign of the adjusted residual and a magnitude band 0–3. */
export interface ResidualShade {
  readonly sign: 'above' | 'below' | 'none';
  /** 0: |r| < 1.96, 1: < 2.58, 2: < 3.29, 3: beyond (two-sided 5 %, 1 %, 0.1 % normal points). */
  readonly level: 0 | 1 | 2 | 3;
  /** Opacity 0–1 to mix the theme colour with, growing with |r| and capped. */
  readonly strength: number;
}

/** r×c grid of adjusted residuals. */
export interface ResidualGridPlot {
  readonly kind: 'residual-grid';
  readonly title: string;
  readonly rowLabels: readonly string[];
  readonly columnLabels: readonly string[];
  readonly residuals: readonly (readonly number[])[];
  readonly shades: readonly (readonly ResidualShade[])[];
  /** The text of each cell: sign and |r| with the decimals setting ("+2.31", "−0.40"), "–" when undefined. */
  readonly labels: readonly (readonly string[])[];
}

/** Confidence interval for σ (or σ²) against the hypothesised value. */
export interface IntervalPlot {
  readonly kind: 'interval';
  readonly title: string;
  readonly parameter: string;
  readonly xMin: number;
  readonly xMax: number;
  readonly lower: number;
  readonly upper: number;
  /** Point estimate (sample s or s²). */
  readonly estimate: number;
  /** Hypothesised value (σ0 or σ0²). */
  readonly reference: number;
  readonly referenceInside: boolean;
  readonly level: number;
  /** A one-sided bound: the open side runs off the axis (drawn as an arrow, never as a closed bar). */
  readonly openLower?: boolean;
  readonly openUpper?: boolean;
  readonly ticks: readonly number[];
  readonly tickLabels: readonly string[];
  /** Host-formatted ends, estimate and the reference marker's label ("σ0 = 1.5"). */
  readonly texts: { readonly lower: string; readonly upper: string; readonly estimate: string; readonly reference: string };
}

export type Plot = DensityPlot | DeviationPlot | ResidualGridPlot | IntervalPlot | PowerCurvePlot;

/** The table of the panel, with every number already formatted by the host. */
export interface ResultTableRow {
  readonly label: string;
  readonly cells: readonly { readonly text: string; readonly residual?: number; readonly shade?: ResidualShade; readonly signText?: string }[];
}

export interface ResultTable {
  readonly caption: string;
  readonly header: readonly string[];
  /** Explanations of the column headers, same length as `header` ('' where none). */
  readonly headerExplain?: readonly string[];
  readonly rows: readonly ResultTableRow[];
}

export interface PanelStrings {
  readonly [key: string]: string;
}

/** Everything the panel shows. Computed in the host; the webview only renders it. */
export interface PanelPayload {
  readonly id: string;
  readonly title: string;
  readonly sourceDescription: string;
  /** The answer in plain words (names quoted, never markdown). */
  readonly headline: string;
  /** The size of the effect and the failed assumption with its alternative, shown right under the answer. */
  readonly headlineEffect?: string;
  readonly headlineAssumption?: string;
  /** The procedure's key estimate, promoted beside the headline. */
  readonly keyEstimate?: { readonly label: string; readonly value: string; readonly explain?: string };
  readonly apaLine: string;
  /** "2 of 3 tests in this folder" (with the adjusted p when known), when the result belongs to a family of tests. */
  readonly familyLine?: string;
  readonly significant: boolean | null;
  /** `explain`: what the figure is, how to read it, one formula or citation (src/report/explanations.ts). */
  readonly keyFigures: readonly { readonly label: string; readonly value: string; readonly explain?: string }[];
  readonly tables: readonly ResultTable[];
  readonly plots: readonly Plot[];
  /** Each plot drawn as SVG for the panel (src/report/svg.ts, mode "panel"), same order as `plots`. */
  readonly plotSvgs?: readonly string[];
  /** Each plot's text alternative, same order. */
  readonly plotDescriptions?: readonly string[];
  readonly assumptions: readonly { readonly id: string; readonly title: string; readonly status: 'met' | 'failed' | 'unchecked'; readonly explanation: string; readonly alternative?: string; readonly explain?: string }[];
  readonly notices: readonly { readonly severity: 'info' | 'warning'; readonly message: string; readonly explain?: string }[];
  /** Secondary statistics and estimates, in any number: a generic name/value list. */
  readonly otherStatistics: readonly { readonly name: string; readonly value: string; readonly note?: string; readonly explain?: string }[];
  /** The caution that applies to this kind of result ('' when none does, as for a distribution lookup). */
  readonly caution: string;
  /** Plain text and markdown, produced by src/report (not by the webview). */
  readonly text: string;
  readonly markdown: string;
  /** The raw result, for "save as spec" and for tests. */
  readonly result: Result;
  /** Whether the spec behind this result can be saved and re-run. */
  readonly canSave: boolean;
  readonly canRerun: boolean;
  readonly strings: PanelStrings;
  /** ISO time the result was computed. */
  readonly computedAt: string;
  /** How the categories are ordered, in words (src/report/panel.ts categoryOrderText). */
  readonly categoryOrder?: string;
  /** Set after "Re-run and compare": the recorded result beside this run. */
  readonly comparison?: Comparison;
  /** The spec that produced the result (plain JSON) and where it lives, so a restored panel can still re-run and save. */
  readonly origin?: PanelOrigin;
}

/** One row of a re-run's before/after table. */
export interface ComparisonRow {
  readonly quantity: string;
  readonly before: string;
  readonly after: string;
  readonly changed: boolean;
  /** The conclusion row when it flipped between significant and not significant. */
  readonly flipped?: boolean;
}

/** A re-run compared with the result recorded in the saved test (src/report/comparison.ts). */
export interface Comparison {
  readonly status: string;
  readonly rows: readonly ComparisonRow[];
  readonly flipped: boolean;
}

export interface PanelOrigin {
  readonly spec: Readonly<Record<string, unknown>>;
  /** Absolute path of the spec file, or of the virtual spec beside the data for an unsaved run. */
  readonly specPath: string;
  /** True when specPath is a saved *.countercheck.json file. */
  readonly saved: boolean;
  /** The document a result can be inserted back into (selection runs). */
  readonly documentUri?: string;
}

export type HostToWebview =
  | { readonly type: 'show'; readonly payload: PanelPayload }
  | { readonly type: 'status'; readonly text: string; readonly level: 'info' | 'error' }
  | { readonly type: 'busy'; readonly busy: boolean }
  /** Draw this standalone SVG on the webview's canvas and answer with a PNG (for "Save plot" as PNG). */
  | { readonly type: 'render-png'; readonly requestId: number; readonly svg: string; readonly scale: number };

export type PanelAction = 'copy-text' | 'copy-markdown' | 'insert' | 'save-spec' | 'rerun' | 'open-new';

export type WebviewToHost =
  | { readonly type: 'ready' }
  | { readonly type: 'action'; readonly action: PanelAction }
  | { readonly type: 'save-plot'; readonly index: number }
  | { readonly type: 'copy-table'; readonly index: number }
  | { readonly type: 'png'; readonly requestId: number; readonly dataUrl?: string; readonly error?: string };

/** What the serializer stores for a panel (vscode.setState in the webview). */
export interface PanelState {
  readonly payload: PanelPayload;
}

export function isWebviewToHost(value: unknown): value is WebviewToHost {
  if (typeof value !== 'object' || value === null) return false;
  const m = value as { type?: unknown; action?: unknown; index?: unknown; requestId?: unknown; dataUrl?: unknown; error?: unknown };
  if (m.type === 'ready') return true;
  if (m.type === 'save-plot' || m.type === 'copy-table') return Number.isInteger(m.index) && (m.index as number) >= 0;
  if (m.type === 'png') return Number.isInteger(m.requestId) && (typeof m.dataUrl === 'string' || typeof m.error === 'string');
  return m.type === 'action' && ['copy-text', 'copy-markdown', 'insert', 'save-spec', 'rerun', 'open-new'].includes(m.action as string);
}
