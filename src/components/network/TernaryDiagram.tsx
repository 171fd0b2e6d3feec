"use client";

import * as d3 from "d3";
import { useMemo } from "react";
import { checkTriple, reachableBoundary, toXY, type Triple } from "@/lib/ternary";

interface Props {
  value: Triple;
  onPick?: (t: Triple) => void;
  size?: number;
}

const PAD = 34;

/**
 * Ternary diagram of the node probabilities: forward at the top, left turn bottom left, right
 * turn bottom right. The shaded curved triangle is the reachable region (a unitary node exists);
 * the chosen point is filled when reachable and hollow red when refused, with a dashed line to
 * the nearest reachable point on the same left : right ratio. Click inside to choose a point.
 */
export function TernaryDiagram({ value, onPick, size = 260 }: Props) {
  const side = size - 2 * PAD;
  const h = (side * Math.sqrt(3)) / 2;
  const height = h + 2 * PAD;
  const P = (t: Triple): [number, number] => {
    const [x, y] = toXY(t);
    return [PAD + x * side, PAD + y * side];
  };
  const region = useMemo(() => {
    const pts = reachableBoundary(90).map((t) => {
      const [x, y] = toXY(t);
      return [PAD + x * side, PAD + y * side] as [number, number];
    });
    return d3.line()(pts)! + "Z";
  }, [side]);
  const verdict = checkTriple(value);
  const sum = value.forward + value.left + value.right;
  const drawable = [value.forward, value.left, value.right].every((x) => Number.isFinite(x) && x >= 0) && sum > 0;
  const shown = drawable ? { forward: value.forward / sum, left: value.left / sum, right: value.right / sum } : null;
  const [px, py] = shown ? P(shown) : [0, 0];
  const corners = { f: P({ forward: 1, left: 0, right: 0 }), l: P({ forward: 0, left: 1, right: 0 }), r: P({ forward: 0, left: 0, right: 1 }) };
  const grid: string[] = [];
  for (let i = 1; i < 5; i++) {
    const a = i / 5;
    for (const [p, q] of [
      [
        { forward: a, left: 1 - a, right: 0 },
        { forward: a, left: 0, right: 1 - a },
      ],
      [
        { left: a, forward: 1 - a, right: 0 },
        { left: a, forward: 0, right: 1 - a },
      ],
      [
        { right: a, forward: 1 - a, left: 0 },
        { right: a, forward: 0, left: 1 - a },
      ],
    ] as [Triple, Triple][]) {
      grid.push(d3.line()([P(p), P(q)])!);
    }
  }
  const pick = (ev: React.MouseEvent<SVGSVGElement>) => {
    if (!onPick) return;
    const rect = ev.currentTarget.getBoundingClientRect();
    const x = (ev.clientX - rect.left - PAD) / side;
    const y = (ev.clientY - rect.top - PAD) / side;
    // Invert the barycentric map: y fixes forward, x splits the rest.
    const forward = 1 - y / (Math.sqrt(3) / 2);
    // x = forward/2 + right (toXY), so right = x - forward/2.
    const f = Math.max(0, Math.min(1, forward));
    const rr = Math.max(0, Math.min(1 - f, x - f / 2));
    const round = (v: number) => Math.round(v * 1000) / 1000;
    const fr = round(f);
    const rrr = round(rr);
    onPick({ forward: fr, right: rrr, left: round(1 - fr - rrr) });
  };
  const ok = verdict.ok;
  const sugg = !verdict.ok && verdict.suggestion ? P(verdict.suggestion) : null;
  return (
    <svg
      width={size}
      height={height}
      viewBox={`0 0 ${size} ${height}`}
      role="img"
      aria-label={
        `Ternary diagram of node probabilities: forward ${value.forward}, left ${value.left}, right ${value.right}; ` +
        `${ok ? "reachable" : "refused, outside the reachable region"}`
      }
      data-testid="ternary"
      data-reachable={ok ? "yes" : "no"}
      onClick={pick}
      className={onPick ? "cursor-crosshair" : undefined}
    >
      <path d={d3.line()([corners.f, corners.l, corners.r])! + "Z"} fill="none" stroke="var(--tk-line-strong)" />
      {grid.map((d, i) => (
        <path key={i} d={d} stroke="var(--tk-line)" strokeWidth={0.7} fill="none" />
      ))}
      <path d={region} fill="var(--tk-accent)" fillOpacity={0.16} stroke="var(--tk-accent)" strokeWidth={1.2} data-region="reachable" />
      <text x={corners.f[0]} y={corners.f[1] - 10} textAnchor="middle" className="fill-fg text-caption font-medium">
        forward
      </text>
      <text x={corners.l[0] - 4} y={corners.l[1] + 18} textAnchor="start" className="fill-fg text-caption font-medium">
        left
      </text>
      <text x={corners.r[0] + 4} y={corners.r[1] + 18} textAnchor="end" className="fill-fg text-caption font-medium">
        right
      </text>
      <text
        x={P({ forward: 1 / 9, left: 4 / 9, right: 4 / 9 })[0] + 6}
        y={P({ forward: 1 / 9, left: 4 / 9, right: 4 / 9 })[1] - 4}
        className="fill-fg-faint text-micro"
      >
        1/9
      </text>
      {sugg && shown ? <line x1={px} y1={py} x2={sugg[0]} y2={sugg[1]} stroke="var(--tk-danger)" strokeDasharray="3 3" /> : null}
      {sugg ? <circle cx={sugg[0]} cy={sugg[1]} r={4} fill="var(--tk-accent)" data-point="suggestion" /> : null}
      {shown ? (
        <circle
          cx={px}
          cy={py}
          r={5.5}
          fill={ok ? "var(--tk-warm)" : "var(--tk-surface)"}
          stroke={ok ? "var(--tk-fg)" : "var(--tk-danger)"}
          strokeWidth={2}
          data-point="chosen"
        />
      ) : null}
    </svg>
  );
}
