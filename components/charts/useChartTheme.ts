'use client';
/**
 * The chart theme with the page's real font families. Canvas text takes concrete family names, so the
 * variables set by next/font are read once mounted, and again when the web fonts have finished loading
 * (a chart drawn before that would keep the fallback face).
 */
import { useEffect, useState } from 'react';
import { chartThemeFrom, DEFAULT_CHART_THEME, type ChartTheme } from './theme';

export function useChartTheme(): ChartTheme {
  const [theme, setTheme] = useState<ChartTheme>(DEFAULT_CHART_THEME);
  useEffect(() => {
    let live = true;
    const read = () => {
      if (!live) return;
      const style = getComputedStyle(document.body);
      const next = chartThemeFrom((name) => style.getPropertyValue(name));
      setTheme((prev) => (prev.fontMono === next.fontMono && prev.fontSans === next.fontSans ? prev : next));
    };
    read();
    document.fonts?.ready.then(read, () => undefined);
    return () => {
      live = false;
    };
  }, []);
  return theme;
}
