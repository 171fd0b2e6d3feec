"use client";

import * as d3 from "d3";
import { useEffect, useRef, useState, type ReactNode } from "react";
import { ChartFrame, type CsvData } from "./ChartFrame";
import type { Palette } from "./palette";
import { useChartBox } from "./useWidth";

export interface ChartDrawing {
  /** The cleared SVG, width x height; lay the plot out in it with drawFrame (axes.ts). */
  svg: d3.Selection<SVGSVGElement, unknown, null, undefined>;
  width: number;
  height: number;
  palette: Palette;
  setReadout: (text: string | null) => void;
}

/**
 * What every d3 chart needs around its own drawing: the width of its box, the theme's colours,
 * the SVG and the hover read-out. `draw` gets a cleared SVG and runs again whenever the theme,
 * the width, the height or one of `deps` changes; it lays out its axes with drawFrame, which
 * measures the tick labels and titles for the margins.
 */
export function useD3Chart(height: number, draw: (c: ChartDrawing) => void, deps: readonly unknown[]) {
  const { ref, width, palette } = useChartBox();
  const svgRef = useRef<SVGSVGElement>(null);
  const [readout, setReadout] = useState<string | null>(null);
  useEffect(() => {
    if (!palette || !svgRef.current) return;
    const svg = d3.select(svgRef.current);
    svg.selectAll("*").remove();
    draw({ svg, width, height, palette, setReadout });
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
  children,
}: {
  chart: D3ChartState;
  title: string;
  name: string;
  label: string;
  height: number;
  csv?: CsvData;
  extra?: ReactNode;
  /** Controls or notes shown under the figure (e.g. a valley toggle, a colour-scale note). */
  children?: ReactNode;
}) {
  // The refs of useD3Chart go to ref attributes and to the frame's export buttons (read on click,
  // never during render); the hook rules cannot see that through the chart object.
  /* eslint-disable react-hooks/refs */
  return (
    <ChartFrame title={title} name={name} svgRef={chart.svgRef} csv={csv} readout={chart.readout} extra={extra}>
      <div ref={chart.ref}>
        <svg ref={chart.svgRef} width={chart.width} height={height} role="img" aria-label={label} />
      </div>
      {children}
    </ChartFrame>
  );
  /* eslint-enable react-hooks/refs */
}
