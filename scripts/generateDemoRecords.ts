/**
 * Writes the synthetic demo records beside shared/spectra/demo/demoRecords.ts.
 * Run with `npx tsx scripts/generateDemoRecords.ts`; a unit test checks the
 * committed files match what the generator produces.
 */
import { writeFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { demoRecords } from '../shared/spectra/demo/demoRecords.js'

const demoDir = fileURLToPath(new URL('../shared/spectra/demo/', import.meta.url))
for (const record of demoRecords()) {
  writeFileSync(`${demoDir}${record.fileName}`, record.text)
  console.log(`${record.fileName}: ${record.points} points at ${record.dtS} s, ${record.text.length} bytes`)
}
