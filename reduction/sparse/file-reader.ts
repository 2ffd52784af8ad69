/**
 * Matrix Market coordinate files streamed from disk into compressed sparse columns: the file is read in
 * 1 MiB chunks and parsed line by line by the same reader as a text in memory (`parseCoordinateLines`,
 * matrix-market.ts), so neither the file's text nor any dense n×n array is ever held — only the coordinates
 * (checked against the file's size before they are allocated) and the result. The upload check and the
 * engine tasks read large models this way.
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { StringDecoder } from 'node:string_decoder';
import { ModelError } from '../errors';
import type { CscMatrix } from './model';
import { parseCoordinateLines, type LineSource } from './matrix-market';

const CHUNK_BYTES = 1 << 20;

class FileLines implements LineSource {
  line = 0;
  private readonly buffer = Buffer.alloc(CHUNK_BYTES);
  private readonly decoder = new StringDecoder('utf8');
  private pending = '';
  private queue: string[] = [];
  private at = 0;
  private ended = false;
  private first = true;

  constructor(private readonly fd: number) {}

  private fill(): void {
    const got = readSync(this.fd, this.buffer, 0, CHUNK_BYTES, null);
    let text = got > 0 ? this.decoder.write(this.buffer.subarray(0, got)) : this.decoder.end();
    if (got === 0) this.ended = true;
    if (this.first) {
      text = text.replace(/^\uFEFF/, '');
      this.first = false;
    }
    text = this.pending + text;
    const parts = text.split('\n');
    this.pending = this.ended ? '' : parts.pop()!;
    if (this.ended && parts.length > 0 && parts[parts.length - 1] === '') parts.pop();
    this.queue = parts;
    this.at = 0;
  }

  /** The next line as it is (without its line break), or null at the end. */
  raw(): string | null {
    while (this.at >= this.queue.length) {
      if (this.ended) return null;
      this.fill();
    }
    this.line++;
    return this.queue[this.at++];
  }

  next(): string | null {
    for (;;) {
      const r = this.raw();
      if (r === null) return null;
      const t = r.trim();
      if (t === '' || t.startsWith('%')) continue;
      return t;
    }
  }
}

/**
 * Reads a Matrix Market coordinate file at `path` into CSC (the errors of parseSparseMatrixMarket, naming
 * `field` and `fileName`; an unreadable file is `unreadable_file`).
 */
export function readSparseMatrixMarketFile(path: string, field: string, fileName: string): CscMatrix {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (e) {
    throw new ModelError('unreadable_file', field, `${fileName}: the file cannot be read (${(e as Error).message})`);
  }
  try {
    const size = fstatSync(fd).size;
    const lines = new FileLines(fd);
    const header = lines.raw() ?? '';
    return parseCoordinateLines(header, lines, size, field, fileName);
  } finally {
    closeSync(fd);
  }
}

/** The declared row count of a coordinate file from its first lines only (null when it is not one). */
export function coordinateFileRows(path: string): number | null {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch {
    return null;
  }
  try {
    const lines = new FileLines(fd);
    const header = (lines.raw() ?? '').trim().toLowerCase().split(/\s+/);
    if (header[0] !== '%%matrixmarket' || header[1] !== 'matrix' || header[2] !== 'coordinate') return null;
    const size = lines.next();
    const t = size?.split(/\s+/) ?? [];
    return t.length === 3 && /^\d+$/.test(t[0]) ? Number(t[0]) : null;
  } finally {
    closeSync(fd);
  }
}
