/**
 * The fonts of the exports. The shipped Source Sans 3 comes as subset WOFF files
 * (@fontsource/source-sans-3): the latin file has no Greek letters, so ζ, β and γ would
 * print as blanks, nor the accented letters of many station names. For each weight, all
 * the subsets are merged into one TrueType file, which both renderers read: pdfkit embeds
 * it in the PDF (only the glyphs used) and resvg (which reads only TTF/OTF) draws the PNG
 * with it. `npm run build` writes the files (scripts/buildFonts.ts); a clean checkout that
 * has not been built makes them on first use.
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
  return path.join(dir, `source-sans-3-merged-${WEIGHTS[weight]}.ttf`)
}

/** Latin first: where subsets share a code point, the latin glyph is kept. */
const SUBSETS = [
  'latin',
  'latin-ext',
  'greek',
  'greek-ext',
  'cyrillic',
  'cyrillic-ext',
  'vietnamese',
] as const

function fontsourceFile(subset: (typeof SUBSETS)[number], weight: number): string {
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
 * The latin subset with the glyphs of the other subsets added for the code points it
 * lacks. All subsets share the 1000-unit em of the family, so no glyph is scaled.
 */
export function mergedFontTtf(weight: ExportFontWeight): Buffer {
  const [first, ...others] = SUBSETS
  const base = readWoff(fontsourceFile(first, WEIGHTS[weight]))
  const ttf = base.get()
  const present = new Set(ttf.glyf.flatMap((g) => g.unicode ?? []))
  for (const subset of others) {
    const extra = readWoff(fontsourceFile(subset, WEIGHTS[weight])).get()
    if (extra.head.unitsPerEm !== ttf.head.unitsPerEm) {
      throw new Error(`the ${subset} subset of Source Sans 3 differs in unitsPerEm`)
    }
    for (const glyph of extra.glyf) {
      const codePoints = (glyph.unicode ?? []).filter((u) => !present.has(u))
      if (codePoints.length === 0) continue
      ttf.glyf.push({ ...glyph, unicode: codePoints })
      for (const u of codePoints) present.add(u)
    }
  }
  // One family with two weights (OS/2 usWeightClass 400 and 600), so resvg picks the
  // semibold face for font-weight="600" instead of a family of its own.
  ttf.name.fontFamily = EXPORT_FONT_FAMILY
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

/** Plain spellings of symbols Source Sans 3 does not draw (it has no mathematical operators). */
const SUBSTITUTES: Record<string, string> = {
  '≥': '>=',
  '≤': '<=',
  '≈': '~',
  '≠': '!=',
  '√': 'sqrt',
  '∞': 'infinity',
  '→': '->',
  '←': '<-',
}

let drawable: Set<number> | undefined

/**
 * `text` with every character the merged font cannot draw replaced: known symbols by a
 * plain spelling, anything else by "?". Without this a missing glyph prints as a blank box
 * in the PDF and vanishes from the PNG.
 */
export function printableText(text: string): string {
  drawable ??= new Set(
    Object.keys(Font.create(readFileSync(exportFontFiles().regular), { type: 'ttf' }).get().cmap).map(Number),
  )
  const glyphs = drawable
  let out = ''
  for (const char of text) {
    const code = char.codePointAt(0) as number
    if (code < 0x20 || glyphs.has(code)) out += char
    else out += SUBSTITUTES[char] ?? '?'
  }
  return out
}

/** A copy of a JSON-like value with every string passed through {@link printableText}. */
export function printableDeep<T>(value: T): T {
  if (typeof value === 'string') return printableText(value) as T
  if (Array.isArray(value)) return value.map((item: unknown) => printableDeep(item)) as T
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value).map(([key, item]) => [key, printableDeep(item)])) as T
  }
  return value
}
