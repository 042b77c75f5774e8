"use client";

/**
 * Save a chart drawn as SVG in the page: as a standalone SVG file (the page's colour variables written in, a
 * title and legend lines added beneath, since the page gives those in HTML), or as a PNG drawn from that SVG.
 */

/** Offer `blob` as a download named `name`. */
export function download(name: string, blob: Blob): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

const SVG_NS = "http://www.w3.org/2000/svg";
const LINE = 18;

/** The chart's SVG as a file's text: a white ground, its colours resolved, `lines` of text under it. */
export function standaloneSvg(svg: SVGSVGElement, lines: string[]): { text: string; width: number; height: number } {
  const width = Math.round(svg.getBoundingClientRect().width);
  const plotHeight = Math.round(svg.getBoundingClientRect().height);
  const height = plotHeight + 12 + lines.length * LINE;
  const copy = svg.cloneNode(true) as SVGSVGElement;
  copy.setAttribute("xmlns", SVG_NS);
  copy.setAttribute("width", String(width));
  copy.setAttribute("height", String(height));
  copy.setAttribute("viewBox", `0 0 ${width} ${height}`);
  copy.setAttribute("font-family", "IBM Plex Sans, Helvetica, Arial, sans-serif");
  copy.removeAttribute("class");
  copy.removeAttribute("style");
  const ground = document.createElementNS(SVG_NS, "rect");
  ground.setAttribute("width", "100%");
  ground.setAttribute("height", "100%");
  ground.setAttribute("fill", "#ffffff");
  copy.insertBefore(ground, copy.firstChild);
  lines.forEach((l, i) => {
    const t = document.createElementNS(SVG_NS, "text");
    t.setAttribute("x", "12");
    t.setAttribute("y", String(plotHeight + 12 + (i + 0.75) * LINE));
    t.setAttribute("font-size", "12");
    t.setAttribute("fill", "#161b22");
    t.textContent = l;
    copy.append(t);
  });
  const root = getComputedStyle(document.documentElement);
  const text = new XMLSerializer().serializeToString(copy).replace(/var\((--[\w-]+)\)/g, (_m, name: string) => root.getPropertyValue(name).trim() || "#161b22");
  return { text, width, height };
}

/** The same picture as PNG at twice the size on screen, for slides and documents. */
export async function pngOf(svg: { text: string; width: number; height: number }): Promise<Blob> {
  const img = new Image();
  img.src = `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg.text)}`;
  await img.decode();
  const canvas = document.createElement("canvas");
  canvas.width = svg.width * 2;
  canvas.height = svg.height * 2;
  const ctx = canvas.getContext("2d")!;
  ctx.scale(2, 2);
  ctx.drawImage(img, 0, 0);
  return new Promise((resolve, reject) => canvas.toBlob((b) => (b ? resolve(b) : reject(new Error("The browser could not draw the PNG."))), "image/png"));
}
