// The lineage graph option, checked by reading it and by drawing it with the real ECharts (server-side SVG
// renderer): states by shape and words, columns by kind, re-run edges dashed. The lineage is invented.
import { describe, expect, it } from 'vitest';
import * as echarts from 'echarts/core';
import { GraphChart } from 'echarts/charts';
import { AriaComponent, GridComponent, TooltipComponent } from 'echarts/components';
import { SVGRenderer } from 'echarts/renderers';
import { buildLineageOption, COLUMN_X, graphHeight, nodeLabel } from '@/components/lineage/lineage-option';
import type { Lineage } from '@/lib/lineage';

echarts.use([GraphChart, AriaComponent, GridComponent, TooltipComponent, SVGRenderer]);

const LINEAGE: Lineage = {
  title: 'Lineage of Kiln zone 2',
  sourceModel: { id: 'sm', name: 'Kiln zone 2', slug: 'kiln-zone-2' },
  nodes: [
    { kind: 'source_version', id: 's1', sourceModelName: 'Kiln zone 2', sourceModelSlug: 'kiln-zone-2', number: 1, checksum: 'a', states: 400, isNewest: false, registeredAt: '' },
    { kind: 'source_version', id: 's2', sourceModelName: 'Kiln zone 2', sourceModelSlug: 'kiln-zone-2', number: 2, checksum: 'b', states: 420, isNewest: true, registeredAt: '' },
    { kind: 'reduced_version', id: 'r1', reducedModelName: 'Zone 2 ROM', reducedModelSlug: 'zone-2-rom', number: 1, status: 'approved', order: 12, method: 'balanced', upstreamChanged: true, sourceNumber: 1, newestSourceNumber: 2, matricesSha256: 'c', inputChecksum: 'a', engineVersion: '1' },
    { kind: 'reduced_version', id: 'r2', reducedModelName: 'Zone 2 ROM', reducedModelSlug: 'zone-2-rom', number: 2, status: 'in_review', order: 12, method: 'balanced', upstreamChanged: false, sourceNumber: 2, newestSourceNumber: 2, matricesSha256: 'd', inputChecksum: 'b', engineVersion: '1' },
    { kind: 'project', id: 'p1', name: 'Zone 2 temperature loop', slug: 'zone-2-loop' },
  ],
  edges: [
    { from: 's1', to: 'r1', kind: 'reduced_from', label: 'balanced, r = 12' },
    { from: 's2', to: 'r2', kind: 'reduced_from', label: 'balanced, r = 12' },
    { from: 'r1', to: 'r2', kind: 'predecessor', label: 'made from' },
    { from: 'r1', to: 'p1', kind: 'pinned_by', label: 'exact pin' },
  ],
};

type Series = { data: { id: string; value: [number, number]; symbol: string; name: string }[]; links: { source: string; lineStyle: { type: string } }[] };
const seriesOf = (option: ReturnType<typeof buildLineageOption>) => (option.series as Series[])[0];

describe('the lineage graph option', () => {
  it('writes the state in words beside its glyph, and marks an upstream change in words', () => {
    expect(nodeLabel(LINEAGE.nodes[2])).toBe('Zone 2 ROM v1\n● approved · r = 12\n↑ upstream changed');
    expect(nodeLabel(LINEAGE.nodes[3])).toBe('Zone 2 ROM v2\n◆ in review · r = 12');
    expect(nodeLabel(LINEAGE.nodes[1])).toBe('Kiln zone 2 v2 (newest)\n▬ source version · 420 states');
  });

  it('places each kind in its own column, one row per node, and draws states as distinct shapes', () => {
    const { data, links } = seriesOf(buildLineageOption(LINEAGE, { fontSans: 'sans-serif' }));
    expect(data.map((d) => [d.id, ...d.value, d.symbol])).toEqual([
      ['s1', COLUMN_X.source_version, 0, 'roundRect'],
      ['s2', COLUMN_X.source_version, 1, 'roundRect'],
      ['r1', COLUMN_X.reduced_version, 0, 'circle'],
      ['r2', COLUMN_X.reduced_version, 1, 'diamond'],
      ['p1', COLUMN_X.project, 0, 'pin'],
    ]);
    expect(links.map((l) => l.lineStyle.type)).toEqual(['solid', 'solid', 'dashed', 'solid']);
    expect(graphHeight(LINEAGE)).toBe(2 * 64 + 40);
  });

  it('keeps nodes at their size and in the drawing when a column holds a single node', () => {
    const single: Lineage = { ...LINEAGE, nodes: [LINEAGE.nodes[0], LINEAGE.nodes[2]], edges: [LINEAGE.edges[0]] };
    const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: 960, height: graphHeight(single) });
    try {
      chart.setOption(buildLineageOption(single, { fontSans: 'sans-serif' }));
      const svg = chart.renderToSVGString();
      // Every drawn coordinate lies inside the picture (a degenerate layout sends them to ±∞ or far off).
      const numbers = [...svg.matchAll(/(?:x|y|cx|cy)="(-?[0-9.]+)"/g)].map((m) => Number(m[1]));
      expect(numbers.length).toBeGreaterThan(0);
      for (const n of numbers) expect(Math.abs(n)).toBeLessThan(1000);
      expect(svg).toContain('● approved · r = 1');
    } finally {
      chart.dispose();
    }
  });

  it('is drawn by ECharts with every label in the picture', () => {
    const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: 960, height: graphHeight(LINEAGE) });
    try {
      chart.setOption(buildLineageOption(LINEAGE, { fontSans: 'sans-serif' }));
      const svg = chart.renderToSVGString();
      for (const text of ['● approved · r = 12', '◆ in review · r = 12', '↑ upstream changed', '⬣ project: Zone 2 temperature loop', 'made from', 'exact pin']) {
        expect(svg).toContain(text);
      }
      expect(svg).toContain('stroke-dasharray');
    } finally {
      chart.dispose();
    }
  });
});
