/**
 * The diagram as a standalone SVG file (drawn by shared/diagram/svg.ts, the
 * same code the server's report uses) and a PNG drawn from it.
 */
export { diagramSvg, type DiagramSvg } from "../../../shared/diagram/svg";
import type { DiagramSvg } from "../../../shared/diagram/svg";

/** Draws the SVG on a canvas at `scale` (2 for sharp prints) and returns a PNG. */
export async function svgToPng({ svg, width, height }: DiagramSvg, scale = 2): Promise<Blob> {
  const url = URL.createObjectURL(new Blob([svg], { type: "image/svg+xml" }));
  try {
    const image = new Image();
    image.src = url;
    await image.decode();
    const canvas = window.document.createElement("canvas");
    canvas.width = Math.ceil(width * scale);
    canvas.height = Math.ceil(height * scale);
    const context = canvas.getContext("2d");
    if (!context) throw new Error("This browser cannot draw images for export.");
    context.drawImage(image, 0, 0, canvas.width, canvas.height);
    return await new Promise<Blob>((resolve, reject) =>
      canvas.toBlob((blob) => (blob ? resolve(blob) : reject(new Error("The PNG could not be made."))), "image/png"),
    );
  } finally {
    URL.revokeObjectURL(url);
  }
}

/** Saves a blob as a file through the browser's download. */
export function downloadBlob(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const link = window.document.createElement("a");
  link.href = url;
  link.download = fileName;
  window.document.body.append(link);
  link.click();
  link.remove();
  window.setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** "Hillside newts" → "hillside-newts". */
export function fileSlug(name: string): string {
  const slug = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "");
  return slug.slice(0, 60) || "life-cycle";
}
