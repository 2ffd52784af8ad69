'use client';
/**
 * Pole map of a source or reduced model, with a switch between linear and symmetric-log axes
 * (pole-map-option.ts says what the log view does). Stability is told by marker shape and legend words.
 */
import { useId, useState } from 'react';
import { EChart, useBuiltOption } from './EChart';
import { buildPoleMapOption, type PoleMapData, type PoleMapScale } from './pole-map-option';
import { STABILITY_STYLE } from './theme';
import { useChartTheme } from './useChartTheme';

export interface PoleMapProps extends Omit<PoleMapData, 'scale'> {
  /** view shown first; the user can switch */
  readonly initialScale?: PoleMapScale;
  readonly height?: number | string;
  readonly title?: string;
}

const STABILITY_LEGEND = (['stable', 'marginal', 'unstable'] as const).map((s) => `${STABILITY_STYLE[s].glyph} ${s}`).join(' · ');

const SCALE_WORDS: Record<PoleMapScale, string> = { linear: 'Linear', symlog: 'Symmetric log' };

export function PoleMap({ re, im, stability, kept, timeBase, initialScale = 'symlog', height = 380, title = 'Poles' }: PoleMapProps) {
  const [scale, setScale] = useState<PoleMapScale>(initialScale);
  const theme = useChartTheme();
  const built = useBuiltOption(
    () => buildPoleMapOption({ re, im, stability, kept, timeBase, scale }, theme),
    [re, im, stability, kept, timeBase, scale, theme],
  );
  const headingId = useId();
  return (
    <figure aria-labelledby={headingId} className="panel p-4">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <figcaption id={headingId} className="text-sm font-medium">
          {title} <span className="num text-graphite-soft">({re.length})</span>
        </figcaption>
        <div role="group" aria-label="Pole map axes" className="flex gap-1">
          {(Object.keys(SCALE_WORDS) as PoleMapScale[]).map((s) => (
            <button
              key={s}
              type="button"
              aria-pressed={scale === s}
              onClick={() => setScale(s)}
              className={`button-quiet ${scale === s ? 'border-teal text-teal' : ''}`}
            >
              {SCALE_WORDS[s]}
            </button>
          ))}
        </div>
      </div>
      <EChart built={built} height={height} testId="pole-map" />
      <p className="mt-2 text-xs text-graphite-soft">
        {STABILITY_LEGEND}
        {kept ? ' · filled kept, hollow truncated' : ''}. Scroll to zoom.
      </p>
    </figure>
  );
}
