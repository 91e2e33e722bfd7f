// A worker thread with its own SQLite connection, for the concurrent-batch test. Node 20 cannot
// start a Worker from a .ts file (STACK.md), so this shim registers tsx's loader first.
import { register } from 'tsx/esm/api'

register()
await import('./batchWriter.ts')
