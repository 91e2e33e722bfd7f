/** Build step: writes the TTF fonts the PDF and PNG exports use (see server/exports/exportFonts.ts). */
import { writeExportFonts } from '../server/exports/exportFonts.js'

for (const file of writeExportFonts()) console.log(`wrote ${file}`)
