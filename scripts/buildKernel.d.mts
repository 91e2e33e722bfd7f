export const KERNEL_SOURCE_PATH: string
export const KERNEL_MODULE_PATH: string
export function compileKernel(): Promise<Uint8Array>
export function kernelModuleText(binary: Uint8Array): string
