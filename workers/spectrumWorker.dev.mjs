// Development and test entry of the spectrum worker. Node 20 cannot start a Worker from a .ts
// file, even under tsx (STACK.md), so this shim registers tsx's loader and then imports it.
import { register } from 'tsx/esm/api'

register()
await import('./spectrumWorker.ts')
