/**
 * The charts' look in one place (DEVELOPERS.md, Conventions, "Look"): a quiet drafting sheet (warm
 * off-white, graphite ink, one deep teal accent), full-model curves solid graphite, reduced-model curves dashed teal, bounds as a
 * shaded teal band, and the Okabe & Ito palette wherever several series need telling apart.
 *
 * Palette: M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and presentations that
 * are friendly to colorblind people", J*Fly, 2008 (the eight-colour set, hex values as published there).
 *
 * Fonts: canvas text cannot resolve CSS variables, so the React wrappers read the page's font variables
 * (`--font-plex-mono` / `--font-plex-sans` set by app/fonts.ts, or `--font-mono` / `--font-sans`) once
 * mounted (see `useChartTheme`) and pass concrete family names into the option builders.
 */

export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/** The same inks as the page's Tailwind tokens (tailwind.config.ts: sheet, graphite, rule, teal). */
export const INK = {
  /** page background of the drafting sheet */
  paper: '#f6f3ea',
  /** text and full-model curves */
  graphite: '#2a2c2e',
  /** axis lines and secondary labels */
  graphiteMuted: '#575a5e',
  /** the thin grid rule */
  rule: '#d6cfbd',
  /** the single accent: reduced-model curves, bounds, the chosen order */
  teal: '#0c5b5f',
  /** fill of a bound band: the accent, faint enough that curves inside stay readable */
  tealBand: 'rgba(12, 91, 95, 0.13)',
} as const;

/**
 * Series colours beyond full/reduced, in the order they are handed out. Yellow is left out (too faint on
 * the off-white sheet) and black too (it reads as the graphite full-model ink).
 */
export const SERIES_COLORS: readonly string[] = [
  OKABE_ITO.blue,
  OKABE_ITO.vermillion,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.orange,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.skyBlue,
];

export function seriesColor(index: number): string {
  const n = SERIES_COLORS.length;
  return SERIES_COLORS[((index % n) + n) % n];
}

/** Colours for the verdict of an acceptance band; always shown beside the words PASS / FAIL. */
export const VERDICT_COLORS = {
  pass: OKABE_ITO.bluishGreen,
  fail: OKABE_ITO.vermillion,
  'not-checked': OKABE_ITO.orange,
} as const;

/**
 * How a pole's stability is drawn wherever it appears (pole map markers, legend, modes table): the shape
 * and its text glyph carry the meaning, the Okabe & Ito colour only repeats it.
 */
export const STABILITY_STYLE = {
  stable: { symbol: 'circle', glyph: '●', color: OKABE_ITO.blue },
  marginal: { symbol: 'diamond', glyph: '◆', color: OKABE_ITO.orange },
  unstable: { symbol: 'triangle', glyph: '▲', color: OKABE_ITO.vermillion },
} as const;

export interface ChartTheme {
  /** concrete font family list for numbers (tabular figures) */
  readonly fontMono: string;
  /** concrete font family list for words */
  readonly fontSans: string;
}

export const FALLBACK_MONO = 'ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace';
export const FALLBACK_SANS = 'ui-sans-serif, system-ui, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif';

export const DEFAULT_CHART_THEME: ChartTheme = { fontMono: FALLBACK_MONO, fontSans: FALLBACK_SANS };

/** How the two model curves are drawn everywhere; tests check builders against these. */
export const FULL_LINE = { color: INK.graphite, type: 'solid', width: 1.6 } as const;
export const REDUCED_LINE = { color: INK.teal, type: 'dashed', width: 1.8 } as const;
export const BOUND_LINE = { color: INK.teal, type: 'solid', width: 1.2 } as const;

/** CSS custom properties that may hold the page's font families, first found wins. */
export const MONO_FONT_VARIABLES = ['--font-plex-mono', '--font-mono'] as const;
export const SANS_FONT_VARIABLES = ['--font-plex-sans', '--font-sans'] as const;

/** Builds a chart theme from a variable lookup (getComputedStyle in the browser); blanks fall back. */
export function chartThemeFrom(lookup: (name: string) => string): ChartTheme {
  const first = (names: readonly string[]) => names.map((n) => lookup(n).trim()).find((v) => v !== '');
  const mono = first(MONO_FONT_VARIABLES);
  const sans = first(SANS_FONT_VARIABLES);
  return {
    fontMono: mono ? `${mono}, ${FALLBACK_MONO}` : FALLBACK_MONO,
    fontSans: sans ? `${sans}, ${FALLBACK_SANS}` : FALLBACK_SANS,
  };
}
