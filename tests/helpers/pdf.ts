import type { Response } from "superagent";
import { PDFParse } from "pdf-parse";

/** The text of a PDF, extracted with pdf-parse (PDF.js underneath), and its page count. */
export async function pdfText(bytes: Uint8Array): Promise<{ text: string; pages: number }> {
  const parser = new PDFParse({ data: new Uint8Array(bytes) });
  try {
    const result = await parser.getText();
    return { text: result.text, pages: result.total };
  } finally {
    await parser.destroy();
  }
}

/** supertest parser that keeps a binary body (PDF, zip) as a Buffer. */
export function binaryParser(res: Response, callback: (err: Error | null, body: unknown) => void): void {
  const stream = res as unknown as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on("data", (c: Buffer) => chunks.push(c));
  stream.on("end", () => callback(null, Buffer.concat(chunks)));
  stream.on("error", (e: Error) => callback(e, Buffer.alloc(0)));
}
