import PDFDocument from 'pdfkit';
import type { PaperSize } from '../handout.js';

export interface DocumentInfo {
  title: string;
  /** BCP-47 language of the content (screen readers, text extraction). */
  language: string;
  /** Creation date written into the file (passed in so output is reproducible). */
  createdAt: Date;
}

/**
 * A PDFKit document for the product's pages: no margins (the flow places everything), pages
 * buffered so footers can say "page n of m", and fixed metadata dates.
 */
export function createPdfDocument(paper: PaperSize, info: DocumentInfo): PDFKit.PDFDocument {
  return new PDFDocument({
    size: paper === 'a4' ? 'A4' : 'LETTER',
    margin: 0,
    bufferPages: true,
    lang: info.language,
    displayTitle: true,
    pdfVersion: '1.7',
    info: {
      Title: info.title,
      Creator: 'phosledger',
      Producer: 'phosledger',
      CreationDate: info.createdAt,
      ModDate: info.createdAt,
    },
  });
}

/** Ends the document and collects its bytes. */
export function finishPdf(doc: PDFKit.PDFDocument): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
    doc.end();
  });
}
