import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/** A PDF's text, page by page, as pdf.js (the PDF reader inside Firefox) extracts it. */
export async function pdfText(bytes: Buffer): Promise<string[]> {
  const doc = await getDocument({ data: new Uint8Array(bytes), useSystemFonts: false, isEvalSupported: false, verbosity: 0 }).promise;
  try {
    const pages: string[] = [];
    for (let n = 1; n <= doc.numPages; n++) {
      const page = await doc.getPage(n);
      const content = await page.getTextContent();
      pages.push(content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? '\n' : '') : '')).join(''));
    }
    return pages;
  } finally {
    await doc.destroy();
  }
}

/** How many image XObjects the file holds (pdfkit writes each placed JPEG as one). */
export function imageCount(bytes: Buffer): number {
  return (bytes.toString('latin1').match(/\/Subtype \/Image/g) ?? []).length;
}

/** How many TrueType font programs are embedded in the file. */
export function embeddedFontCount(bytes: Buffer): number {
  return (bytes.toString('latin1').match(/\/FontFile2 /g) ?? []).length;
}

type SuperagentParser = (res: import('supertest').Response, callback: (err: Error | null, body: unknown) => void) => void;

/** A supertest parser that keeps a binary body (a PDF, a zip) as a Buffer, and still reads problems as JSON. */
export const binaryBody = ((res: import('node:http').IncomingMessage, done: (err: Error | null, body: unknown) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => {
    const bytes = Buffer.concat(chunks);
    done(null, String(res.headers['content-type']).includes('json') ? JSON.parse(bytes.toString('utf8')) : bytes);
  });
}) as unknown as SuperagentParser;
