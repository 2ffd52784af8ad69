/**
 * The one backend interface of the dense engine. Every kernel the engine needs (products, LU, Schur and
 * Hessenberg forms, eigenvalues and vectors, SVD, symmetric eigenproblems, Cholesky and QR variants,
 * quasi-triangular Sylvester solves, the batched Hessenberg frequency response) is an operation of
 * `DenseKernels` (declared in `dense-kernels.ts`); the algorithms above it (`lyapunov.ts`, `expm.ts`,
 * `sylvester.ts`, the methods in `reduction/`) ask `kernels()` and do not care who serves them.
 *
 * Two backends implement it:
 *   native    Debian's OpenBLAS/LAPACK (LAPACKE) through the Node-API addon in `reduction/native/`
 *             (`native.ts`); the default when the addon is built.
 *   portable  our TypeScript/WebAssembly kernels (`portable.ts`), for machines without a compiler.
 * `MODESHELF_LINALG=native|portable` chooses; unset, native is used when it loads and portable otherwise
 * (`linalgBackendReport()` says which and why). `MODESHELF_LINALG=native` with no loadable addon is an error.
 * Contracts (argument order, shapes, layouts, what is returned) are those documented in the portable
 * kernel files; both backends pass the same reference tests.
 */
import type { DenseKernels } from './dense-kernels';
import { portableKernels } from './portable';
import { loadNativeKernels } from './native';

export type { DenseKernels } from './dense-kernels';

interface Selection {
  readonly kernels: DenseKernels;
  readonly reason: string;
}

let selection: Selection | undefined;

function select(): Selection {
  const wanted = (typeof process !== 'undefined' ? process.env?.MODESHELF_LINALG : undefined)?.trim() ?? '';
  if (wanted === 'portable') return { kernels: portableKernels, reason: 'MODESHELF_LINALG=portable' };
  if (wanted !== '' && wanted !== 'native') {
    throw new Error(`MODESHELF_LINALG must be "native" or "portable", got "${wanted}"`);
  }
  const loaded = loadNativeKernels();
  if (loaded.kernels) return { kernels: loaded.kernels, reason: `native addon ${loaded.path}` };
  if (wanted === 'native') {
    throw new Error(`MODESHELF_LINALG=native but the native addon could not be loaded: ${loaded.error} (build it with \`npm run build:native\`)`);
  }
  return { kernels: portableKernels, reason: `native addon unavailable (${loaded.error}); portable kernels` };
}

/** The active backend (chosen once per thread on first use). */
export function kernels(): DenseKernels {
  if (!selection) selection = select();
  return selection.kernels;
}

/** Which backend serves the engine and why. */
export function linalgBackendReport(): { backend: 'native' | 'portable'; reason: string } {
  const k = kernels();
  return { backend: k.name, reason: selection!.reason };
}

/** Switches the backend for this thread (tests and benchmarks run both on the same inputs). */
export function useLinalgBackend(name: 'native' | 'portable'): void {
  if (name === 'portable') {
    selection = { kernels: portableKernels, reason: 'chosen by useLinalgBackend' };
    return;
  }
  const loaded = loadNativeKernels();
  if (!loaded.kernels) throw new Error(`the native backend is not available: ${loaded.error}`);
  selection = { kernels: loaded.kernels, reason: 'chosen by useLinalgBackend' };
}
