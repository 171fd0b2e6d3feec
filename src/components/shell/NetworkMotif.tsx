import { networkGeometry } from "@/lib/lattice";

/**
 * A small triangular network drawn statically (server-rendered): one-way links with arrowheads
 * in valley K, the two leads on the faces perpendicular to a1. Decorative.
 */
export function NetworkMotif({ columns = 7, rows = 6, className }: { columns?: number; rows?: number; className?: string }) {
  const g = networkGeometry({ lattice: "triangular", columns, rows, transverse: "open", valley: "K" });
  const k = 52;
  const pad = 40;
  const w = (g.leads.rightX - g.leads.leftX) * k + 2 * pad;
  const h = (g.bounds.yMax - g.bounds.yMin) * k + 2 * pad;
  const X = (u: number) => pad + (u - g.leads.leftX) * k;
  const Y = (v: number) => h - pad - (v - g.bounds.yMin) * k;
  const lines = [];
  for (let i = 0; i < g.linkCount; i++) {
    const [x0, y0, x1, y1] = [g.links[4 * i], g.links[4 * i + 1], g.links[4 * i + 2], g.links[4 * i + 3]];
    const f = g.linkKind[i] ? 0.9 : 0.62;
    lines.push(
      <line
        key={i}
        x1={X(x0)}
        y1={Y(y0)}
        x2={X(x0 + (x1 - x0) * f)}
        y2={Y(y0 + (y1 - y0) * f)}
        stroke={g.linkKind[i] === 1 ? "var(--tk-plot-lead)" : "var(--tk-plot-link)"}
        strokeWidth={1.6}
        markerEnd="url(#motif-arrow)"
        opacity={g.linkKind[i] === 2 ? 0.45 : 1}
      />,
    );
    if (!g.linkKind[i])
      lines.push(
        <line key={`t${i}`} x1={X(x0 + (x1 - x0) * 0.6)} y1={Y(y0 + (y1 - y0) * 0.6)} x2={X(x1)} y2={Y(y1)} stroke="var(--tk-plot-link)" strokeWidth={1.6} />,
      );
  }
  return (
    <svg viewBox={`0 0 ${w} ${h}`} className={className} aria-hidden="true" focusable="false">
      <defs>
        <marker id="motif-arrow" viewBox="0 0 10 10" refX="8" refY="5" markerWidth="8" markerHeight="8" orient="auto" markerUnits="userSpaceOnUse">
          <path d="M0,0 L10,5 L0,10 L3,5 z" fill="var(--tk-plot-link)" />
        </marker>
      </defs>
      <rect x={X(g.leads.leftX) - 5} y={pad - 18} width={10} height={h - 2 * pad + 36} rx={4} fill="var(--tk-plot-lead)" />
      <rect x={X(g.leads.rightX) - 5} y={pad - 18} width={10} height={h - 2 * pad + 36} rx={4} fill="var(--tk-plot-lead)" />
      {lines}
      {Array.from({ length: g.nodeCount }, (_, i) => (
        <circle key={i} cx={X(g.nodes[2 * i])} cy={Y(g.nodes[2 * i + 1])} r={3.2} fill="var(--tk-plot-node)" />
      ))}
    </svg>
  );
}
