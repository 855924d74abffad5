/**
 * The diagram as a standalone SVG, built from the document and the stage
 * boxes with the same geometry as the screen. The editor's SVG/PNG download
 * and the server's report both draw it with this function.
 */
import type { LifeCycle } from "../lifecycle";
import { DEFAULT_STAGE_SIZE, type Rect, arrowGeometry, arrowLanes } from "./geometry";
import { formatShare, formatValue, rateLabel } from "./labels";
import { CLAY, DEFAULT_STAGE_COLOR, INK, PAPER, REPRODUCTION_DASH, SPRUCE } from "./palette";

/** What a stage box shows after analysis. */
export interface DiagramReadout {
  share: number | null;
  value: number | null;
  /** The numbers describe an earlier version of the document: not drawn. */
  stale: boolean;
}

const FONT = "'Atkinson Hyperlegible', system-ui, sans-serif";
const MARGIN = 24;

export function escapeXml(text: string): string {
  return text.replace(/[<>&"']/g, (c) => ({ "<": "&lt;", ">": "&gt;", "&": "&amp;", '"': "&quot;", "'": "&apos;" })[c] ?? c);
}

/** Rough text width for label boxes (the font is not measured outside the page). */
const textWidth = (text: string, size: number, bold = false) => text.length * size * (bold ? 0.6 : 0.55);

export interface DiagramSvg {
  svg: string;
  width: number;
  height: number;
}

export function diagramSvg(document: LifeCycle, sizes: ReadonlyMap<string, { width: number; height: number }>, readouts: ReadonlyMap<string, DiagramReadout> = new Map()): DiagramSvg {
  const rects = new Map<string, Rect>();
  for (const s of document.stages) {
    const size = sizes.get(s.id) ?? DEFAULT_STAGE_SIZE;
    rects.set(s.id, { x: s.position.x, y: s.position.y, width: size.width, height: size.height });
  }
  const lanes = arrowLanes(document.transitions, rects);
  const arrows: string[] = [];
  const labels: string[] = [];
  // Bounds: every stage box, every arrow's hull and every label box.
  const xs: number[] = [];
  const ys: number[] = [];
  for (const r of rects.values()) {
    xs.push(r.x, r.x + r.width);
    ys.push(r.y, r.y + r.height);
  }
  for (const t of document.transitions) {
    const source = rects.get(t.from);
    const target = rects.get(t.to);
    const lane = lanes.get(t.id);
    if (!source || !target || !lane) continue;
    const { path, label, hull } = arrowGeometry(source, target, lane);
    for (const p of hull) {
      xs.push(p.x);
      ys.push(p.y);
    }
    const reproduction = t.kind === "reproduction";
    const color = reproduction ? CLAY : SPRUCE;
    arrows.push(
      `<path d="${path}" fill="none" stroke="${color}" stroke-width="2"${reproduction ? ` stroke-dasharray="${REPRODUCTION_DASH}"` : ""} marker-end="url(#sw-arrow-${reproduction ? "reproduction" : "survival"})"/>`,
    );
    const text = rateLabel(t.rate);
    const w = textWidth(text, 12, true) + 10;
    xs.push(label.x - w / 2, label.x + w / 2);
    ys.push(label.y - 10, label.y + 10);
    labels.push(
      `<g><rect x="${(label.x - w / 2).toFixed(1)}" y="${(label.y - 10).toFixed(1)}" width="${w.toFixed(1)}" height="20" rx="4" fill="#ffffff" stroke="${color}"${reproduction ? ' stroke-dasharray="3 2"' : ""}/>` +
        `<text x="${label.x.toFixed(1)}" y="${(label.y + 4).toFixed(1)}" text-anchor="middle" font-size="12" font-weight="bold" fill="${INK}">${escapeXml(text)}</text></g>`,
    );
  }

  const stages = document.stages.map((s) => {
    const r = rects.get(s.id)!;
    const readout = readouts.get(s.id);
    const lines = readout && !readout.stale ? [`Stable share ${formatShare(readout.share)}`, `Repr. value ${formatValue(readout.value)}`] : [];
    const nameY = lines.length ? r.y + 22 : r.y + r.height / 2 + 5;
    return (
      `<g><rect x="${r.x}" y="${r.y}" width="${r.width}" height="${r.height}" rx="8" fill="#ffffff" stroke="${INK}" stroke-opacity="0.35"/>` +
      `<rect x="${r.x}" y="${r.y}" width="6" height="${r.height}" rx="3" fill="${s.color ?? DEFAULT_STAGE_COLOR}"/>` +
      `<text x="${r.x + 16}" y="${nameY}" font-size="14" font-weight="bold" fill="${INK}">${escapeXml(s.name)}</text>` +
      lines.map((line, i) => `<text x="${r.x + 16}" y="${r.y + 40 + i * 15}" font-size="11" fill="${INK}">${escapeXml(line)}</text>`).join("") +
      `</g>`
    );
  });

  // Loops, not Math.min(...xs): a large life cycle has more points than a call takes arguments.
  const low = (v: number[]) => v.reduce((m, x) => (x < m ? x : m), Infinity);
  const high = (v: number[]) => v.reduce((m, x) => (x > m ? x : m), -Infinity);
  const minX = xs.length ? Math.floor(low(xs)) - MARGIN : 0;
  const minY = ys.length ? Math.floor(low(ys)) - MARGIN : 0;
  const width = xs.length ? Math.ceil(high(xs)) + MARGIN - minX : 200;
  const height = ys.length ? Math.ceil(high(ys)) + MARGIN - minY : 100;

  const marker = (id: string, color: string) =>
    `<marker id="${id}" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="14" markerHeight="14" markerUnits="userSpaceOnUse" orient="auto-start-reverse"><path d="M0,0 L10,5 L0,10 z" fill="${color}"/></marker>`;

  const svg =
    `<?xml version="1.0" encoding="UTF-8"?>\n` +
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="${minX} ${minY} ${width} ${height}" font-family="${FONT}">` +
    `<title>${escapeXml(document.name)}: life-cycle diagram</title>` +
    `<defs>${marker("sw-arrow-survival", SPRUCE)}${marker("sw-arrow-reproduction", CLAY)}</defs>` +
    `<rect x="${minX}" y="${minY}" width="${width}" height="${height}" fill="${PAPER}"/>` +
    `<g>${arrows.join("")}</g><g>${stages.join("")}</g><g>${labels.join("")}</g></svg>`;
  return { svg, width, height };
}
