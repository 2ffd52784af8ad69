import { describe, expect, it } from 'vitest';
import { channelLabel, clampChannel, signalNames } from '@/components/charts/channel-names';
import { chartThemeFrom, FALLBACK_MONO, seriesColor, SERIES_COLORS } from '@/components/charts/theme';

describe('channel names', () => {
  it('uses the uploaded names and fills gaps with u1…, y1…', () => {
    expect(signalNames(['force F1', '', '  '], 4, 'u')).toEqual(['force F1', 'u2', 'u3', 'u4']);
    expect(signalNames(undefined, 2, 'y')).toEqual(['y1', 'y2']);
    expect(() => signalNames(undefined, -1, 'y')).toThrow(/outputCount must be a non-negative integer/);
  });

  it('writes a channel as input → output', () => {
    expect(channelLabel(['F1', 'F2'], ['x1'], { input: 1, output: 0 })).toBe('F2 → x1');
  });

  it('keeps a stored selection inside a model with fewer channels', () => {
    expect(clampChannel({ input: 5, output: -2 }, 3, 2)).toEqual({ input: 2, output: 0 });
    expect(clampChannel({ input: 1, output: 1 }, 0, 0)).toEqual({ input: 0, output: 0 });
  });
});

describe('chart theme', () => {
  it('takes the page font variables, first found wins, with fallbacks after them', () => {
    const vars: Record<string, string> = { '--font-plex-mono': " '__plexMono_a1', '__plexMono_Fallback_a1'", '--font-sans': 'Inter' };
    const theme = chartThemeFrom((n) => vars[n] ?? '');
    expect(theme.fontMono).toBe(`'__plexMono_a1', '__plexMono_Fallback_a1', ${FALLBACK_MONO}`);
    expect(theme.fontSans.startsWith('Inter, ')).toBe(true);
    expect(chartThemeFrom(() => '').fontMono).toBe(FALLBACK_MONO);
  });

  it('hands out Okabe & Ito colours in a cycle, without yellow or black', () => {
    expect(SERIES_COLORS).not.toContain('#F0E442');
    expect(SERIES_COLORS).not.toContain('#000000');
    expect(seriesColor(0)).toBe('#0072B2');
    expect(seriesColor(SERIES_COLORS.length)).toBe(seriesColor(0));
    expect(seriesColor(-1)).toBe(SERIES_COLORS[SERIES_COLORS.length - 1]);
  });
});
