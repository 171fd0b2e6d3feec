"use client";

import * as d3 from "d3";
import { useEffect, useRef, useState, type ReactNode } from "react";
import { ChartFrame, type CsvData } from "./ChartFrame";
import { MARGIN } from "./axes";
import type { Palette } from "./palette";
import { useChartBox } from "./useWidth";

export interface ChartDrawing {
  svg: d3.Selection<SVGSVGElement, unknown, null, undefined>;
  /** The plot area: a group shifted by the margin, innerW x innerH. */
  g: d3.Selection<SVGGElement, unknown, null, undefined>;
  width: number;
  innerW: number;
  innerH: number;
  palette: Palette;
  setReadout: (text: string | null) => void;
}

export type Margin = typeof MARGIN;

/**
 * What every d3 chart needs around its own drawing: the width of its box, the theme's colours,
 * the SVG and the hover read-out. `draw` gets a cleared SVG with the plot group already in place,
 * and runs again whenever the theme, the width, the height or one of `deps` changes.
 */
export function useD3Chart(height: number, draw: (c: ChartDrawing) => void, deps: readonly unknown[], margin: Margin = MARGIN) {
  const { ref, width, palette } = useChartBox();
  const svgRef = useRef<SVGSVGElement>(null);
  const [readout, setReadout] = useState<string | null>(null);
  useEffect(() => {
    if (!palette || !svgRef.current) return;
    const svg = d3.select(svgRef.current);
    svg.selectAll("*").remove();
    const innerW = width - margin.left - margin.right;
    const innerH = height - margin.top - margin.bottom;
    const g = svg.append("g").attr("transform", `translate(${margin.left},${margin.top})`);
    draw({ svg, g, width, innerW, innerH, palette, setReadout });
  }, [palette, width, height, ...deps]); // eslint-disable-line react-hooks/exhaustive-deps
  return { ref, svgRef, width, palette, readout };
}

export type D3ChartState = ReturnType<typeof useD3Chart>;

/** A chart of useD3Chart in its frame: title, export buttons, the sized SVG and the read-out. */
export function D3Chart({
  chart,
  title,
  name,
  label,
  height,
  csv,
  extra,
}: {
  chart: D3ChartState;
  title: string;
  name: string;
  label: string;
  height: number;
  csv?: CsvData;
  extra?: ReactNode;
}) {
  // The refs of useD3Chart go to ref attributes and to the frame's export buttons (read on click,
  // never during render); the hook rules cannot see that through the chart object.
  /* eslint-disable react-hooks/refs */
  return (
    <ChartFrame title={title} name={name} svgRef={chart.svgRef} csv={csv} readout={chart.readout} extra={extra}>
      <div ref={chart.ref}>
        <svg ref={chart.svgRef} width={chart.width} height={height} role="img" aria-label={label} />
      </div>
    </ChartFrame>
  );
  /* eslint-enable react-hooks/refs */
}
