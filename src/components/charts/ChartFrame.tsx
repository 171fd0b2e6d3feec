"use client";

import { useRef, type ReactNode, type RefObject } from "react";
import { exportCsv, exportPng, exportSvg } from "@/lib/exportFigure";

export interface CsvData {
  header: string[];
  rows: (number | string | null | undefined)[][];
  comments?: string[];
}

/** Title, figure, hover read-out and SVG / PNG / CSV export buttons around one chart. */
export function ChartFrame({
  title,
  name,
  svgRef,
  csv,
  readout,
  children,
  extra,
}: {
  title: string;
  name: string;
  svgRef: RefObject<SVGSVGElement | null>;
  csv?: CsvData;
  readout?: ReactNode;
  children: ReactNode;
  extra?: ReactNode;
}) {
  const box = useRef<HTMLDivElement>(null);
  return (
    <figure className="tk-card min-w-0 space-y-2 p-4" data-chart={name}>
      <figcaption className="flex flex-wrap items-center justify-between gap-2">
        <h3 className="text-body font-semibold">{title}</h3>
        <div className="flex flex-wrap gap-1.5" role="group" aria-label={`Export ${title}`}>
          <button type="button" className="tk-btn-quiet" onClick={() => svgRef.current && exportSvg(svgRef.current, `${name}.svg`)}>
            SVG
          </button>
          <button type="button" className="tk-btn-quiet" onClick={() => svgRef.current && void exportPng(svgRef.current, `${name}.png`)}>
            PNG
          </button>
          {csv ? (
            <button type="button" className="tk-btn-quiet" onClick={() => exportCsv(`${name}.csv`, csv.header, csv.rows, csv.comments)}>
              CSV
            </button>
          ) : null}
        </div>
      </figcaption>
      <div ref={box} className="relative min-w-0">
        {children}
      </div>
      <div className="flex min-h-5 flex-wrap items-center justify-between gap-2">
        <p className="font-mono text-caption text-fg-soft tk-num" aria-live="polite" data-testid="readout">
          {readout ?? <span className="text-fg-faint">hover the plot to read values</span>}
        </p>
        {extra}
      </div>
    </figure>
  );
}
