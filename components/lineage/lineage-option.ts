/**
 * The lineage graph as an ECharts option: source-model versions in the left column, reduced-model versions
 * in the middle, the controller projects whose pins resolve to them on the right; arrows point from what a
 * thing was made from to what was made. Each node's state is its shape and its label's words (e.g.
 * "◆ in review"), with the Okabe & Ito colour repeating it (components/review/status-style.ts). Pure: no
 * DOM, so it is checked by drawing it with ECharts' server-side SVG renderer.
 */
import type { EChartsCoreOption } from 'echarts/core';
import { INK } from '@/components/charts/theme';
import { PROJECT_STYLE, SOURCE_VERSION_STYLE, STATUS_STYLE, UPSTREAM_CHANGED_TEXT, type NodeStyle } from '@/components/review/status-style';
import type { Lineage, LineageNode } from '@/lib/lineage';

/** Columns on a hidden value axis (0 … 2); rows are whole numbers on a hidden, inverted value axis. */
export const COLUMN_X = { source_version: 0, reduced_version: 1, project: 2 } as const;
export const ROW_HEIGHT = 64;
const SYMBOL_SIZE = 18;

export function nodeStyle(node: LineageNode): NodeStyle {
  if (node.kind === 'source_version') return SOURCE_VERSION_STYLE;
  if (node.kind === 'project') return PROJECT_STYLE;
  return STATUS_STYLE[node.status];
}

/** The words a node is labelled with; the state is always written out. */
export function nodeLabel(node: LineageNode): string {
  if (node.kind === 'source_version') {
    return `${node.sourceModelName} v${node.number}${node.isNewest ? ' (newest)' : ''}\n${SOURCE_VERSION_STYLE.glyph} source version · ${node.states} states`;
  }
  if (node.kind === 'project') return `${PROJECT_STYLE.glyph} project: ${node.name}`;
  const style = STATUS_STYLE[node.status];
  const upstream = node.upstreamChanged ? `\n↑ ${UPSTREAM_CHANGED_TEXT}` : '';
  return `${node.reducedModelName} v${node.number}\n${style.glyph} ${style.label} · r = ${node.order}${upstream}`;
}

export function graphHeight(lineage: Lineage): number {
  const counts = (['source_version', 'reduced_version', 'project'] as const).map((k) => lineage.nodes.filter((n) => n.kind === k).length);
  return Math.max(2, ...counts) * ROW_HEIGHT + 40;
}

export function buildLineageOption(lineage: Lineage, fonts: { fontSans: string }): EChartsCoreOption {
  const rowOf = new Map<string, number>();
  const seen = { source_version: 0, reduced_version: 0, project: 0 };
  for (const node of lineage.nodes) rowOf.set(node.id, seen[node.kind]++);
  const data = lineage.nodes.map((node) => {
    const style = nodeStyle(node);
    const hollow = style.symbol.startsWith('empty');
    return {
      id: node.id,
      name: nodeLabel(node),
      // On a cartesian grid with fixed axis ranges, so one node per column does not stretch the layout.
      value: [COLUMN_X[node.kind], rowOf.get(node.id)!],
      symbol: style.symbol,
      symbolSize: node.kind === 'project' ? SYMBOL_SIZE + 4 : SYMBOL_SIZE,
      itemStyle: { color: hollow ? INK.paper : style.color, borderColor: style.color, borderWidth: 2 },
      label: {
        show: true,
        position: node.kind === 'project' ? 'right' : 'bottom',
        formatter: '{b}',
        color: INK.graphite,
        fontFamily: fonts.fontSans,
        fontSize: 11,
        lineHeight: 14,
      },
      // What a click opens (components/lineage/LineageGraph.tsx).
      kind: node.kind,
    };
  });
  const links = lineage.edges.map((edge) => ({
    source: edge.from,
    target: edge.to,
    value: edge.label,
    lineStyle: {
      color: edge.kind === 'pinned_by' ? PROJECT_STYLE.color : INK.graphiteMuted,
      type: edge.kind === 'predecessor' ? 'dashed' : 'solid',
      width: 1.2,
      curveness: edge.kind === 'predecessor' ? 0.35 : 0,
    },
    label: { show: edge.kind !== 'reduced_from', formatter: edge.label, fontSize: 10, color: INK.graphiteMuted, fontFamily: fonts.fontSans },
  }));
  const rows = Math.max(2, ...Object.values(seen));
  return {
    grid: { left: 24, right: 240, top: 16, bottom: 40 },
    xAxis: { type: 'value', show: false, min: -0.08, max: 2.05 },
    yAxis: { type: 'value', show: false, inverse: true, min: -0.4, max: rows - 0.6 },
    aria: { enabled: true, label: { description: `${lineage.title}: ${lineage.nodes.length} items, ${lineage.edges.length} links. The list below the graph gives the same in words.` } },
    tooltip: { trigger: 'item', formatter: (p: { dataType?: string; name?: string; value?: unknown }) => (p.dataType === 'edge' ? String(p.value ?? '') : String(p.name ?? '').replace(/\n/g, '<br>')) },
    animation: false,
    series: [
      {
        type: 'graph',
        layout: 'none',
        coordinateSystem: 'cartesian2d',
        roam: false,
        edgeSymbol: ['none', 'arrow'],
        edgeSymbolSize: 7,
        data,
        links,
        emphasis: { focus: 'adjacency' },
      },
    ],
  };
}
