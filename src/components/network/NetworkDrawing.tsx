"use client";

import * as d3 from "d3";
import { useEffect, useMemo, useRef } from "react";
import { linkCountOf, networkGeometry, type NetworkGeometry, type NetworkShape } from "@/lib/lattice";
import type { Palette } from "@/components/charts/palette";
import { usePalette, useWidth } from "@/components/charts/useWidth";

/** Past this many links the drawing switches from SVG elements to one canvas. */
export const SVG_LINK_LIMIT = 3000;

export interface LinkValues {
  /** One value per link (same order as the geometry), drawn as colour; e.g. the LDOS map. */
  values: ArrayLike<number>;
  color: (v: number) => string;
}

interface Props {
  shape: NetworkShape;
  /** Length of one link in nm, to label the scale bar (optional). */
  linkNm?: number;
  height?: number;
  linkValues?: LinkValues;
  label?: string;
  /** Draw these links instead of the lattice of `shape` (e.g. the links of a result). */
  custom?: NetworkGeometry;
  /** Side contacts of a Hall bar: named windows of columns on the top and bottom edges. */
  contacts?: DrawnContact[];
}

export interface DrawnContact {
  name: string;
  edge: "top" | "bottom";
  fromColumn: number;
  toColumn: number;
}

/**
 * The network drawn from its description: nodes, directed links with arrowheads in the chosen
 * valley, the two leads and the transverse boundary. Zoom with the wheel, pan by dragging.
 * Small networks are SVG elements; large ones are drawn on a canvas with level of detail
 * (arrowheads and nodes appear once a link is long enough on screen to show them).
 * The time of the first draw (geometry + paint, performance.now) is in data-first-draw-ms.
 */
export function NetworkDrawing({ shape, linkNm, height = 420, linkValues, label, custom, contacts }: Props) {
  const links = custom ? custom.linkCount : linkCountOf(shape);
  const mode = links > SVG_LINK_LIMIT ? "canvas" : "svg";
  const { ref: wrapRef, width } = useWidth(640, 240);
  const palette = usePalette(true);

  // valleys belong to the triangular (moiré) network; a square network has one chirality
  const valleyText = shape.lattice === "triangular" ? `valley ${shape.valley}` : null;
  const description =
    `${shape.lattice} network, ${shape.columns} × ${shape.rows} cells, ${links.toLocaleString("en")} links, ` +
    `${valleyText ? `${valleyText}, ` : ""}${shape.transverse} transverse boundary, leads on the left and right`;
  return (
    <figure className="relative overflow-hidden rounded-card border border-line bg-surface">
      <div ref={wrapRef} style={{ height }} className="relative w-full">
        {palette ? (
          mode === "svg" ? (
            <SvgNetwork {...{ shape, custom, width, height, palette, linkValues, contacts }} description={label ?? description} />
          ) : (
            <CanvasNetwork {...{ shape, custom, width, height, palette, linkValues }} description={label ?? description} />
          )
        ) : null}
      </div>
      <figcaption className="flex flex-wrap items-center justify-between gap-2 border-t border-line px-3 py-1.5 text-caption text-fg-faint">
        <span>
          {shape.columns} × {shape.rows} cells · {links.toLocaleString("en")} links{valleyText ? ` · ${valleyText}` : ""}
          {linkNm ? ` · link ${linkNm.toFixed(1)} nm` : ""}
          {contacts?.length && mode === "canvas"
            ? ` · contacts (not drawn at this size): ${contacts.map((c) => `${c.name} ${c.edge} ${c.fromColumn}–${c.toColumn}`).join(", ")}`
            : ""}
        </span>
        <span className="flex items-center gap-3">
          {custom?.hasLeads === false ? null : (
            <span className="flex items-center gap-1">
              <span aria-hidden className="inline-block h-2 w-4 rounded-sm" style={{ background: palette?.lead }} /> lead and its channels, in and out
            </span>
          )}
          <span>scroll to zoom · drag to pan</span>
        </span>
      </figcaption>
    </figure>
  );
}

/** Maps network coordinates (y up, in l) to the screen, fitting the sample with a margin. */
function fitTransform(g: NetworkGeometry, width: number, height: number) {
  const w = g.leads.rightX - g.leads.leftX + 1;
  const h = g.bounds.yMax - g.bounds.yMin + 1.4;
  const k = Math.min(width / w, height / h);
  const cx = (g.leads.leftX + g.leads.rightX) / 2;
  const cy = (g.bounds.yMin + g.bounds.yMax) / 2;
  return { k, x: (u: number) => width / 2 + (u - cx) * k, y: (v: number) => height / 2 - (v - cy) * k };
}

/**
 * Whether a lead channel enters the sample from its lead or leaves into it: the lead links of
 * `links` (kind 1) leave in valley K, the `leadStubs` enter (and the reverse in valley K').
 */
export function leadDirection(g: NetworkGeometry, of: "link" | "stub"): "in" | "out" {
  return (g.valley === "K'") === (of === "link") ? "in" : "out";
}

/** Which lead a channel with these end abscissae belongs to. */
export const leadSide = (g: NetworkGeometry, x0: number, x1: number): "left" | "right" =>
  (x0 + x1) / 2 < (g.bounds.xMin + g.bounds.xMax) / 2 ? "left" : "right";

/**
 * On-screen size of an arrowhead (px) for links `linkPx` long on screen: a fixed fraction of the
 * link, between 4 and 9 px, so that zooming in on a large network does not blow the heads up.
 */
export const arrowPx = (linkPx: number) => Math.max(4, Math.min(9, linkPx * 0.18));

/** What the SVG and the canvas renderers both draw from. */
interface RendererProps {
  shape: NetworkShape;
  custom?: NetworkGeometry;
  width: number;
  height: number;
  palette: Palette;
  linkValues?: LinkValues;
  description: string;
  contacts?: DrawnContact[];
}

function SvgNetwork({ shape, custom, width, height, palette, linkValues, description, contacts }: RendererProps) {
  const svgRef = useRef<SVGSVGElement>(null);
  const gRef = useRef<SVGGElement>(null);
  const geometry = useMemo(() => custom ?? networkGeometry(shape), [custom, shape]);
  useEffect(() => {
    const t0 = performance.now();
    const svg = d3.select(svgRef.current!);
    const root = d3.select(gRef.current!);
    const g = geometry;
    const f = fitTransform(g, width, height);
    root.selectAll("*").remove();
    svg.select("marker#tk-arrow path").attr("fill", palette.link);
    svg.select("marker#tk-arrow-lead path").attr("fill", palette.lead);
    // Leads: bars on the faces perpendicular to a1.
    const y0 = f.y(g.bounds.yMax + 0.5);
    const y1 = f.y(g.bounds.yMin - 0.5);
    root
      .append("g")
      .attr("data-layer", "leads")
      .selectAll("rect")
      .data(
        g.hasLeads === false
          ? []
          : ([
              ["left", g.leads.leftX],
              ["right", g.leads.rightX],
            ] as const),
      )
      .join("rect")
      .attr("data-lead", (d) => d[0])
      .attr("x", (d) => f.x(d[1]) - Math.max(3, f.k * 0.12))
      .attr("width", Math.max(6, f.k * 0.24))
      .attr("y", y0)
      .attr("height", y1 - y0)
      .attr("rx", 3)
      .attr("fill", palette.lead)
      .attr("opacity", 0.85);
    // Boundary: open edges solid, periodic edges dashed (the top and bottom are identified).
    root
      .append("g")
      .attr("data-layer", "boundary")
      .selectAll("line")
      .data([g.bounds.yMax + 0.45, g.bounds.yMin - 0.45])
      .join("line")
      .attr("x1", f.x(g.bounds.xMin - 0.3))
      .attr("x2", f.x(g.bounds.xMax + 0.3))
      .attr("y1", (d) => f.y(d))
      .attr("y2", (d) => f.y(d))
      .attr("stroke", palette.faint)
      .attr("stroke-width", 1.2)
      .attr("stroke-dasharray", shape.transverse === "periodic" ? "6 4" : null);
    // Hall-bar side contacts: a named window over their columns just outside the top or bottom edge
    // (a triangular column's nodes sit at x = i and i + 1/2; a square column's at x = i).
    const half = shape.lattice === "triangular" ? [0.25, 0.75] : [0.4, 0.4];
    const band = 0.35;
    const windows = root
      .append("g")
      .attr("data-layer", "contacts")
      .selectAll("g")
      .data(contacts ?? [])
      .join("g")
      .attr("data-contact", (c) => c.name);
    windows
      .append("rect")
      .attr("x", (c) => f.x(c.fromColumn - half[0]))
      .attr("width", (c) => f.x(c.toColumn + half[1]) - f.x(c.fromColumn - half[0]))
      .attr("y", (c) => (c.edge === "top" ? f.y(g.bounds.yMax + 0.45 + band) : f.y(g.bounds.yMin - 0.45)))
      .attr("height", band * f.k)
      .attr("rx", 3)
      .attr("fill", palette.lead)
      .attr("opacity", 0.85);
    windows
      .append("text")
      .attr("x", (c) => (f.x(c.fromColumn - half[0]) + f.x(c.toColumn + half[1])) / 2)
      .attr("y", (c) => (c.edge === "top" ? f.y(g.bounds.yMax + 0.45 + band) - 4 : f.y(g.bounds.yMin - 0.45 - band) + 12))
      .attr("text-anchor", "middle")
      .attr("font-size", 11)
      .attr("fill", palette.node)
      .text((c) => c.name);
    const idx = d3.range(g.linkCount);
    root
      .append("g")
      .attr("data-layer", "links")
      .selectAll("line")
      .data(idx)
      .join("line")
      .attr("class", "tk-link")
      .attr("data-kind", (i) => ["inner", "lead", "edge"][g.linkKind[i]])
      .attr("x1", (i) => f.x(g.links[4 * i]))
      .attr("y1", (i) => f.y(g.links[4 * i + 1]))
      // Shorten the head so the arrow tip stops before the node.
      .attr("x2", (i) => f.x(g.links[4 * i] + (g.links[4 * i + 2] - g.links[4 * i]) * (g.linkKind[i] ? 0.92 : 0.82)))
      .attr("y2", (i) => f.y(g.links[4 * i + 1] + (g.links[4 * i + 3] - g.links[4 * i + 1]) * (g.linkKind[i] ? 0.92 : 0.82)))
      .attr("stroke", (i) => (linkValues ? linkValues.color(linkValues.values[i]) : g.linkKind[i] === 1 ? palette.lead : palette.link))
      .attr("stroke-width", linkValues ? Math.max(2, f.k * 0.12) : Math.max(1, Math.min(2.4, f.k * 0.05)))
      .attr("stroke-linecap", "round")
      .attr("marker-end", linkValues ? null : (i) => (g.linkKind[i] === 1 ? "url(#tk-arrow-lead)" : "url(#tk-arrow)"))
      .attr("data-lead-channel", (i) => (g.linkKind[i] === 1 ? leadDirection(g, "link") : null))
      .attr("data-side", (i) => (g.linkKind[i] === 1 ? leadSide(g, g.links[4 * i], g.links[4 * i + 2]) : null));
    // The lead channels of the other direction (entering from the leads in valley K), so both show.
    const stubs = linkValues || g.hasLeads === false ? [] : d3.range((g.leadStubs?.length ?? 0) / 4);
    const S = g.leadStubs ?? new Float32Array(0);
    root
      .append("g")
      .attr("data-layer", "lead-stubs")
      .selectAll("line")
      .data(stubs)
      .join("line")
      .attr("class", "tk-lead-stub")
      .attr("data-kind", "lead")
      .attr("data-lead-channel", leadDirection(g, "stub"))
      .attr("data-side", (i) => leadSide(g, S[4 * i], S[4 * i + 2]))
      .attr("x1", (i) => f.x(S[4 * i]))
      .attr("y1", (i) => f.y(S[4 * i + 1]))
      .attr("x2", (i) => f.x(S[4 * i] + (S[4 * i + 2] - S[4 * i]) * 0.84))
      .attr("y2", (i) => f.y(S[4 * i + 1] + (S[4 * i + 3] - S[4 * i + 1]) * 0.84))
      .attr("stroke", palette.lead)
      .attr("stroke-width", Math.max(1, Math.min(2.4, f.k * 0.05)))
      .attr("stroke-linecap", "round")
      .attr("marker-end", "url(#tk-arrow-lead)");
    root
      .append("g")
      .attr("data-layer", "nodes")
      .selectAll("circle")
      .data(d3.range(g.nodeCount))
      .join("circle")
      .attr("class", "tk-node")
      .attr("cx", (i) => f.x(g.nodes[2 * i]))
      .attr("cy", (i) => f.y(g.nodes[2 * i + 1]))
      .attr("r", Math.max(1.5, Math.min(5, f.k * 0.08)))
      .attr("fill", palette.node);
    // Arrowheads keep their on-screen size under zoom: the markers live in the zoomed group's
    // units, so their size is divided by the zoom factor.
    const sizeArrows = (zoomK: number) => {
      const px = arrowPx(f.k * zoomK);
      svg
        .selectAll("marker")
        .attr("markerWidth", px / zoomK)
        .attr("markerHeight", px / zoomK);
      svg.attr("data-arrow-px", px.toFixed(2)).attr("data-zoom", zoomK.toFixed(3));
    };
    sizeArrows(d3.zoomTransform(svg.node()!).k);
    root.attr("transform", d3.zoomTransform(svg.node()!).toString());
    const zoom = d3
      .zoom<SVGSVGElement, unknown>()
      .scaleExtent([0.5, 20])
      .on("zoom", (ev) => {
        root.attr("transform", ev.transform.toString());
        sizeArrows(ev.transform.k);
      });
    svg.call(zoom);
    const ms = performance.now() - t0;
    svg.attr("data-first-draw-ms", ms.toFixed(1));
    return () => {
      svg.on(".zoom", null);
    };
  }, [geometry, width, height, palette, shape.transverse, shape.lattice, linkValues, contacts]);
  return (
    <svg
      ref={svgRef}
      width={width}
      height={height}
      role="img"
      aria-label={description}
      data-renderer="svg"
      data-links={geometry.linkCount}
      data-nodes={geometry.nodeCount}
      className="block cursor-grab touch-none active:cursor-grabbing"
    >
      <defs>
        <marker id="tk-arrow" viewBox="0 0 10 10" refX="8" refY="5" markerUnits="userSpaceOnUse" orient="auto">
          <path d="M0,0 L10,5 L0,10 L3,5 z" />
        </marker>
        <marker id="tk-arrow-lead" viewBox="0 0 10 10" refX="8" refY="5" markerUnits="userSpaceOnUse" orient="auto">
          <path d="M0,0 L10,5 L0,10 L3,5 z" />
        </marker>
      </defs>
      <g ref={gRef} />
    </svg>
  );
}

/** Paints the whole network on a canvas for a zoom transform; returns the number of links painted. */
export function paintNetwork(
  ctx: CanvasRenderingContext2D,
  g: NetworkGeometry,
  width: number,
  height: number,
  t: d3.ZoomTransform,
  palette: Palette,
  transverse: string,
  linkValues?: LinkValues,
): number {
  const base = fitTransform(g, width, height);
  const k = base.k * t.k;
  const X = (u: number) => t.applyX(base.x(u));
  const Y = (v: number) => t.applyY(base.y(v));
  ctx.clearRect(0, 0, width, height);
  // Visible window in network coordinates, to skip what is off screen.
  const uMin = (t.invertX(0) - base.x(0)) / base.k - 1;
  const uMax = (t.invertX(width) - base.x(0)) / base.k + 1;
  const vMax = -(t.invertY(0) - base.y(0)) / base.k + 1;
  const vMin = -(t.invertY(height) - base.y(0)) / base.k - 1;
  // Leads.
  ctx.fillStyle = palette.lead;
  const ly0 = Y(g.bounds.yMax + 0.5);
  const ly1 = Y(g.bounds.yMin - 0.5);
  const lw = Math.max(4, k * 0.24);
  ctx.globalAlpha = 0.85;
  if (g.hasLeads !== false) {
    ctx.fillRect(X(g.leads.leftX) - lw / 2, ly0, lw, ly1 - ly0);
    ctx.fillRect(X(g.leads.rightX) - lw / 2, ly0, lw, ly1 - ly0);
  }
  ctx.globalAlpha = 1;
  // Boundary.
  ctx.strokeStyle = palette.faint;
  ctx.lineWidth = 1;
  ctx.setLineDash(transverse === "periodic" ? [6, 4] : []);
  ctx.beginPath();
  for (const v of [g.bounds.yMax + 0.45, g.bounds.yMin - 0.45]) {
    ctx.moveTo(X(g.bounds.xMin - 0.3), Y(v));
    ctx.lineTo(X(g.bounds.xMax + 0.3), Y(v));
  }
  ctx.stroke();
  ctx.setLineDash([]);
  // Links: one path per colour; arrowheads once a link is at least 9 px long on screen.
  const arrows = k >= 9;
  const head = Math.min(7, k * 0.18);
  const L = g.links;
  let painted = 0;
  const visible = (i: number) => {
    const x = L[4 * i];
    const y = L[4 * i + 1];
    return x >= uMin && x <= uMax && y >= vMin && y <= vMax;
  };
  ctx.lineWidth = linkValues ? Math.max(1, Math.min(6, k * 0.14)) : Math.max(0.5, Math.min(2.2, k * 0.05));
  if (linkValues) {
    for (let i = 0; i < g.linkCount; i++) {
      if (!visible(i)) continue;
      ctx.strokeStyle = linkValues.color(linkValues.values[i]);
      ctx.beginPath();
      ctx.moveTo(X(L[4 * i]), Y(L[4 * i + 1]));
      ctx.lineTo(X(L[4 * i + 2]), Y(L[4 * i + 3]));
      ctx.stroke();
      painted++;
    }
  } else {
    for (const kind of [0, 2, 1]) {
      ctx.strokeStyle = kind === 1 ? palette.lead : palette.link;
      ctx.fillStyle = ctx.strokeStyle;
      ctx.beginPath();
      for (let i = 0; i < g.linkCount; i++) {
        if (g.linkKind[i] !== kind || !visible(i)) continue;
        ctx.moveTo(X(L[4 * i]), Y(L[4 * i + 1]));
        ctx.lineTo(X(L[4 * i + 2]), Y(L[4 * i + 3]));
        painted++;
      }
      ctx.stroke();
      if (arrows) {
        ctx.beginPath();
        for (let i = 0; i < g.linkCount; i++) {
          if (g.linkKind[i] !== kind || !visible(i)) continue;
          arrowHead(ctx, X(L[4 * i]), Y(L[4 * i + 1]), X(L[4 * i + 2]), Y(L[4 * i + 3]), head);
        }
        ctx.fill();
      }
    }
  }
  // The lead channels of the other direction, so both directions show at every lead.
  const S = g.leadStubs;
  if (S && !linkValues && g.hasLeads !== false) {
    ctx.strokeStyle = palette.lead;
    ctx.fillStyle = palette.lead;
    ctx.beginPath();
    for (let i = 0; i < S.length / 4; i++) {
      ctx.moveTo(X(S[4 * i]), Y(S[4 * i + 1]));
      ctx.lineTo(X(S[4 * i + 2]), Y(S[4 * i + 3]));
    }
    ctx.stroke();
    if (arrows) {
      ctx.beginPath();
      for (let i = 0; i < S.length / 4; i++) arrowHead(ctx, X(S[4 * i]), Y(S[4 * i + 1]), X(S[4 * i + 2]), Y(S[4 * i + 3]), head);
      ctx.fill();
    }
  }
  if (k >= 14) {
    ctx.fillStyle = palette.node;
    ctx.beginPath();
    const r = Math.min(5, k * 0.07);
    for (let i = 0; i < g.nodeCount; i++) {
      const x = g.nodes[2 * i];
      const y = g.nodes[2 * i + 1];
      if (x < uMin || x > uMax || y < vMin || y > vMax) continue;
      ctx.moveTo(X(x) + r, Y(y));
      ctx.arc(X(x), Y(y), r, 0, 2 * Math.PI);
    }
    ctx.fill();
  }
  return painted;
}

/** An arrowhead (a sub-path to fill) at 62 % of the link from (x0, y0) to (x1, y1), so heads of neighbouring links never overlap. */
function arrowHead(ctx: CanvasRenderingContext2D, x0: number, y0: number, x1: number, y1: number, head: number) {
  const dx = x1 - x0;
  const dy = y1 - y0;
  const len = Math.hypot(dx, dy) || 1;
  const ux = dx / len;
  const uy = dy / len;
  const tipX = x0 + dx * 0.62;
  const tipY = y0 + dy * 0.62;
  ctx.moveTo(tipX, tipY);
  ctx.lineTo(tipX - ux * head * 1.6 - uy * head * 0.8, tipY - uy * head * 1.6 + ux * head * 0.8);
  ctx.lineTo(tipX - ux * head * 1.6 + uy * head * 0.8, tipY - uy * head * 1.6 - ux * head * 0.8);
  ctx.closePath();
}

function CanvasNetwork({ shape, custom, width, height, palette, linkValues, description }: RendererProps) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const transformRef = useRef(d3.zoomIdentity);
  const geometryMsRef = useRef(0);
  const geometry = useMemo(() => {
    // Time to build the geometry, measured where it is built (a diagnostic in the canvas's data
    // attributes, read by the performance test); it never changes what is drawn.
    /* eslint-disable react-hooks/purity, react-hooks/refs */
    const t0 = performance.now();
    const g = custom ?? networkGeometry(shape);
    geometryMsRef.current = performance.now() - t0;
    /* eslint-enable react-hooks/purity, react-hooks/refs */
    return g;
  }, [custom, shape]);
  useEffect(() => {
    const canvas = canvasRef.current!;
    const dpr = window.devicePixelRatio || 1;
    canvas.width = Math.floor(width * dpr);
    canvas.height = Math.floor(height * dpr);
    const ctx = canvas.getContext("2d")!;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    const t0 = performance.now();
    const painted = paintNetwork(ctx, geometry, width, height, transformRef.current, palette, shape.transverse, linkValues);
    const paintMs = performance.now() - t0;
    canvas.dataset.firstDrawMs = (geometryMsRef.current + paintMs).toFixed(1);
    canvas.dataset.geometryMs = geometryMsRef.current.toFixed(1);
    canvas.dataset.paintMs = paintMs.toFixed(1);
    canvas.dataset.painted = String(painted);
    let frame = 0;
    const zoom = d3
      .zoom<HTMLCanvasElement, unknown>()
      .scaleExtent([0.5, 80])
      .on("zoom", (ev) => {
        transformRef.current = ev.transform;
        cancelAnimationFrame(frame);
        frame = requestAnimationFrame(() => {
          const n = paintNetwork(ctx, geometry, width, height, transformRef.current, palette, shape.transverse, linkValues);
          canvas.dataset.painted = String(n);
          canvas.dataset.zoom = transformRef.current.k.toFixed(2);
        });
      });
    d3.select(canvas).call(zoom).call(zoom.transform, transformRef.current);
    return () => {
      cancelAnimationFrame(frame);
      d3.select(canvas).on(".zoom", null);
    };
  }, [geometry, width, height, palette, shape.transverse, linkValues]);
  return (
    <canvas
      ref={canvasRef}
      style={{ width, height }}
      role="img"
      aria-label={description}
      data-renderer="canvas"
      data-links={geometry.linkCount}
      data-nodes={geometry.nodeCount}
      className="block cursor-grab touch-none active:cursor-grabbing"
    />
  );
}
