declare module 'svg-to-pdfkit' {
  interface SvgToPdfOptions {
    width?: number
    height?: number
    preserveAspectRatio?: string
    /** Treat SVG user units as points instead of CSS pixels (1 px = 0.75 pt). */
    assumePt?: boolean
    precision?: number
    fontCallback?: (
      family: string,
      bold: boolean,
      italic: boolean,
      fontOptions: { fauxBold?: boolean; fauxItalic?: boolean },
    ) => string
    warningCallback?: (message: string) => void
  }
  function SVGtoPDF(
    doc: PDFKit.PDFDocument,
    svg: string,
    x: number,
    y: number,
    options?: SvgToPdfOptions,
  ): void
  export default SVGtoPDF
}
