/**
 * The fonts of the exports. The shipped Source Sans 3 comes as subset WOFF files
 * (@fontsource/source-sans-3): the latin file has no Greek letters, so ζ, β and γ would
 * print as blanks. For each weight, the latin and greek subsets are merged into one
 * TrueType file, which both renderers read: pdfkit embeds it in the PDF and resvg (which
 * reads only TTF/OTF) draws the PNG with it. `npm run build` writes the files
 * (scripts/buildFonts.ts); a clean checkout that has not been built makes them on first use.
 */
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import path from 'node:path'
import { inflateSync } from 'node:zlib'
import { Font } from 'fonteditor-core'
import { projectRoot } from '../projectRoot.js'

export const EXPORT_FONT_FAMILY = 'Source Sans 3'

export type ExportFontWeight = 'regular' | 'semibold'

const WEIGHTS: Record<ExportFontWeight, number> = { regular: 400, semibold: 600 }

/** Where the merged TTF files live (gitignored; rebuilt by `npm run build`). */
export function exportFontDir(): string {
  return path.join(projectRoot(), 'generated', 'fonts')
}

export function exportFontPath(weight: ExportFontWeight, dir = exportFontDir()): string {
  return path.join(dir, `source-sans-3-latin-greek-${WEIGHTS[weight]}.ttf`)
}

function fontsourceFile(subset: 'latin' | 'greek', weight: number): string {
  const require = createRequire(import.meta.url)
  const pkgDir = path.dirname(require.resolve('@fontsource/source-sans-3/package.json'))
  return path.join(pkgDir, 'files', `source-sans-3-${subset}-${weight}-normal.woff`)
}

/** WOFF 1.0 tables are zlib streams (W3C WOFF File Format 1.0, §5). */
const inflate = (data: number[]) => Array.from(inflateSync(Uint8Array.from(data)))

function readWoff(file: string) {
  return Font.create(readFileSync(file), { type: 'woff', inflate, hinting: false, kerning: true })
}

/**
 * The latin subset with the glyphs of the greek subset added for the code points the
 * latin one lacks. Both subsets share the 1000-unit em of the family, so no glyph is scaled.
 */
export function mergedFontTtf(weight: ExportFontWeight): Buffer {
  const base = readWoff(fontsourceFile('latin', WEIGHTS[weight]))
  const greek = readWoff(fontsourceFile('greek', WEIGHTS[weight])).get()
  const ttf = base.get()
  if (greek.head.unitsPerEm !== ttf.head.unitsPerEm) {
    throw new Error('the latin and greek subsets of Source Sans 3 differ in unitsPerEm')
  }
  const present = new Set(ttf.glyf.flatMap((g) => g.unicode ?? []))
  for (const glyph of greek.glyf) {
    const codePoints = (glyph.unicode ?? []).filter((u) => !present.has(u))
    if (codePoints.length === 0) continue
    ttf.glyf.push({ ...glyph, unicode: codePoints })
    for (const u of codePoints) present.add(u)
  }
  return base.write({ type: 'ttf', toBuffer: true, kerning: true })
}

/** Writes the merged fonts into `dir`, replacing any there; returns the files written. */
export function writeExportFonts(dir = exportFontDir()): string[] {
  mkdirSync(dir, { recursive: true })
  return (Object.keys(WEIGHTS) as ExportFontWeight[]).map((weight) => {
    const file = exportFontPath(weight, dir)
    // Write then rename, so a reader never sees half a file.
    const partial = `${file}.${process.pid}.partial`
    writeFileSync(partial, mergedFontTtf(weight))
    renameSync(partial, file)
    return file
  })
}

let ensured: Record<ExportFontWeight, string> | undefined

/** The merged font files, made on first use when the build has not made them. */
export function exportFontFiles(): Record<ExportFontWeight, string> {
  if (ensured) return ensured
  const files = { regular: exportFontPath('regular'), semibold: exportFontPath('semibold') }
  if (!existsSync(files.regular) || !existsSync(files.semibold)) writeExportFonts()
  ensured = files
  return files
}
