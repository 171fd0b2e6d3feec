/** Export of a figure: the SVG as drawn, a PNG rendered from it, and the data as CSV. */

export function download(filename: string, blob: Blob) {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/** Standalone SVG text: CSS variables resolved to colours, fonts named, a background drawn. */
export function svgText(svg: SVGSVGElement): string {
  const clone = svg.cloneNode(true) as SVGSVGElement;
  const style = getComputedStyle(document.documentElement);
  clone.setAttribute("xmlns", "http://www.w3.org/2000/svg");
  const w = svg.getAttribute("width") ?? String(svg.clientWidth);
  const h = svg.getAttribute("height") ?? String(svg.clientHeight);
  clone.setAttribute("width", w);
  clone.setAttribute("height", h);
  const walk = (el: Element) => {
    for (const attr of ["fill", "stroke", "stop-color"]) {
      const v = el.getAttribute(attr);
      if (v && v.startsWith("var(")) {
        const name = v.slice(4, -1).split(",")[0].trim();
        el.setAttribute(attr, style.getPropertyValue(name).trim() || "#000");
      }
    }
    // Text classes carry colour through Tailwind; give exported text an explicit fill.
    if (el.tagName === "text" && !el.getAttribute("fill")) el.setAttribute("fill", style.getPropertyValue("--tk-fg").trim() || "#000");
    for (const c of Array.from(el.children)) walk(c);
  };
  walk(clone);
  const bg = document.createElementNS("http://www.w3.org/2000/svg", "rect");
  bg.setAttribute("width", "100%");
  bg.setAttribute("height", "100%");
  bg.setAttribute("fill", style.getPropertyValue("--tk-surface").trim() || "#fff");
  clone.insertBefore(bg, clone.firstChild);
  clone.setAttribute("font-family", "Space Grotesk, system-ui, sans-serif");
  return new XMLSerializer().serializeToString(clone);
}

export function exportSvg(svg: SVGSVGElement, filename: string) {
  download(filename, new Blob([svgText(svg)], { type: "image/svg+xml" }));
}

export async function exportPng(svg: SVGSVGElement, filename: string, scale = 2) {
  const text = svgText(svg);
  const img = new Image();
  const url = URL.createObjectURL(new Blob([text], { type: "image/svg+xml" }));
  await new Promise<void>((resolve, reject) => {
    img.onload = () => resolve();
    img.onerror = () => reject(new Error("could not render the figure"));
    img.src = url;
  });
  const canvas = document.createElement("canvas");
  canvas.width = Math.ceil(Number(svg.getAttribute("width")) * scale);
  canvas.height = Math.ceil(Number(svg.getAttribute("height")) * scale);
  const ctx = canvas.getContext("2d")!;
  ctx.scale(scale, scale);
  ctx.drawImage(img, 0, 0);
  URL.revokeObjectURL(url);
  const blob = await new Promise<Blob | null>((r) => canvas.toBlob(r, "image/png"));
  if (blob) download(filename, blob);
}

/** CSV text with a commented header (units, source), RFC 4180 quoting. */
export function toCsv(header: string[], rows: (number | string | null | undefined)[][], comments: string[] = []): string {
  const cell = (v: number | string | null | undefined) => {
    if (v === null || v === undefined) return "";
    const s = String(v);
    return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
  };
  return [...comments.map((c) => `# ${c}`), header.map(cell).join(","), ...rows.map((r) => r.map(cell).join(","))].join("\n") + "\n";
}

export function exportCsv(filename: string, header: string[], rows: (number | string | null | undefined)[][], comments: string[] = []) {
  download(filename, new Blob([toCsv(header, rows, comments)], { type: "text/csv" }));
}
