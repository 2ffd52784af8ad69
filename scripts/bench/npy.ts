/**
 * Reader for NumPy's .npy format, version 1–3, little-endian float64 arrays in C order (the format is
 * specified in NumPy's documentation, "numpy.lib.format"). Enough for the benchmark's matrices.
 */
import { readFileSync } from 'node:fs';
import type { Matrix } from '../../reduction/linalg/matrix';

export function readNpy(file: string): { shape: number[]; data: Float64Array } {
  const buf = readFileSync(file);
  if (buf.readUInt8(0) !== 0x93 || buf.toString('latin1', 1, 6) !== 'NUMPY') throw new Error(`${file}: not a .npy file`);
  const major = buf.readUInt8(6);
  const headerLen = major === 1 ? buf.readUInt16LE(8) : buf.readUInt32LE(8);
  const start = major === 1 ? 10 : 12;
  const header = buf.toString('latin1', start, start + headerLen);
  if (!/'descr':\s*'<f8'/.test(header)) throw new Error(`${file}: only little-endian float64 is supported (${header.trim()})`);
  if (/'fortran_order':\s*True/.test(header)) throw new Error(`${file}: Fortran-order arrays are not supported`);
  const shapeText = /'shape':\s*\(([^)]*)\)/.exec(header);
  if (!shapeText) throw new Error(`${file}: no shape in the header`);
  const shape = shapeText[1].split(',').map((s) => s.trim()).filter((s) => s !== '').map(Number);
  const count = shape.reduce((a, b) => a * b, 1);
  const offset = start + headerLen;
  const data = new Float64Array(count);
  const bytes = new Uint8Array(data.buffer);
  bytes.set(buf.subarray(offset, offset + count * 8));
  return { shape, data };
}

/** A 2-D .npy file as a Matrix (a 1-D file becomes a column). */
export function readNpyMatrix(file: string): Matrix {
  const { shape, data } = readNpy(file);
  const rows = shape[0] ?? 1;
  const cols = shape.length > 1 ? shape.slice(1).reduce((a, b) => a * b, 1) : 1;
  return { rows, cols, data };
}
