import Link from 'next/link';
import type { Lineage, LineageNode } from '@/lib/lineage';
import { StatusBadge, UpstreamChangedBadge } from '@/components/review/StatusBadge';
import { PROJECT_STYLE, SOURCE_VERSION_STYLE } from '@/components/review/status-style';
import { methodOrderLabel } from '@/lib/recipe-words';

const short = (sha: string) => sha.slice(0, 12);

function NodeText({ node }: { node: LineageNode }) {
  if (node.kind === 'source_version') {
    return (
      <>
        <span aria-hidden="true">{SOURCE_VERSION_STYLE.glyph} </span>
        {node.sourceModelName} v{node.number}
        {node.isNewest ? ' (newest)' : ''} · {node.states} states · checksum <span className="num text-xs">{short(node.checksum)}</span>
      </>
    );
  }
  if (node.kind === 'project') {
    return (
      <>
        <span aria-hidden="true">{PROJECT_STYLE.glyph} </span>
        controller project <Link href={`/projects/${node.slug}`}>{node.name}</Link>
      </>
    );
  }
  return (
    <>
      <Link href={`/reviews/${node.id}`}>
        {node.reducedModelName} v{node.number}
      </Link>{' '}
      <StatusBadge status={node.status} /> · {methodOrderLabel(node.method, node.order)} · engine {node.engineVersion} · input{' '}
      <span className="num text-xs">{short(node.inputChecksum)}</span> · matrices <span className="num text-xs">{short(node.matricesSha256)}</span>
      {node.upstreamChanged ? (
        <>
          {' '}
          <UpstreamChangedBadge sourceNumber={node.sourceNumber} newestSourceNumber={node.newestSourceNumber} />
        </>
      ) : null}
    </>
  );
}

/** The lineage in words: every node and what it came from, for reading without the graph. */
export function LineageList({ lineage }: { lineage: Lineage }) {
  const byId = new Map(lineage.nodes.map((n) => [n.id, n]));
  const name = (id: string) => {
    const n = byId.get(id);
    if (!n) return id;
    if (n.kind === 'source_version') return `source v${n.number}`;
    if (n.kind === 'project') return n.name;
    return `${n.reducedModelName} v${n.number}`;
  };
  return (
    <section aria-label="Lineage as a list" className="panel px-4 py-3" data-testid="lineage-list">
      <h2 className="field-label">Lineage as a list</h2>
      <ul className="mt-2 space-y-2 text-sm">
        {lineage.nodes.map((node) => {
          const incoming = lineage.edges.filter((e) => e.to === node.id);
          return (
            <li key={node.id} data-kind={node.kind} data-node={node.id}>
              <NodeText node={node} />
              {incoming.length > 0 ? (
                <span className="block text-xs text-graphite-soft">
                  {incoming
                    .map((e) => (e.kind === 'reduced_from' ? `reduced from ${name(e.from)} (${e.label})` : e.kind === 'predecessor' ? `made from ${name(e.from)}` : `pins ${name(e.from)} (${e.label})`))
                    .join('; ')}
                </span>
              ) : null}
            </li>
          );
        })}
      </ul>
    </section>
  );
}
