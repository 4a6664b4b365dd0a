declare module 'svg-to-pdfkit' {
  /** Draws an SVG string onto a pdfkit document. */
  export default function SVGtoPDF(
    doc: PDFKit.PDFDocument,
    svg: string,
    x?: number,
    y?: number,
    options?: { width?: number; height?: number; preserveAspectRatio?: string; assumePt?: boolean; fontCallback?: (family: string, bold: boolean, italic: boolean) => string },
  ): void;
}
