import { createHash } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { canonicalMatricesJson, matricesSha256 } from '@/lib/checksums';

const model = { A: [[-1, 0.5], [0, -2.25]], B: [[1], [0]], C: [[0, 1]], D: [[0]] };

describe('matricesSha256', () => {
  it('hashes JSON.stringify({A,B,C,D}) of the rows and nothing else', () => {
    const text = '{"A":[[-1,0.5],[0,-2.25]],"B":[[1],[0]],"C":[[0,1]],"D":[[0]]}';
    expect(canonicalMatricesJson(model)).toBe(text);
    // Reference digest from Debian's coreutils sha256sum over the same bytes (FIPS 180-4 SHA-256).
    const reference = execFileSync('sha256sum', [], { input: text }).toString().split(' ')[0];
    expect(matricesSha256(model)).toBe(reference);
  });

  it('ignores extra keys such as names, and key order of the input object', () => {
    const reordered = { D: model.D, C: model.C, B: model.B, A: model.A, labels: { inputs: ['u'] } };
    expect(matricesSha256(reordered)).toBe(matricesSha256(model));
  });

  it('changes when one entry changes in its last bit', () => {
    const nudged = { ...model, A: [[-1, 0.5 + Number.EPSILON / 2], [0, -2.25]] };
    expect(nudged.A[0][1]).not.toBe(0.5);
    expect(matricesSha256(nudged)).not.toBe(matricesSha256(model));
  });

  it('refuses a non-finite entry rather than hashing it as null', () => {
    expect(() => matricesSha256({ ...model, D: [[Number.NaN]] })).toThrow(/matrix D/);
  });

  it('agrees with the Node digest of the same string', () => {
    const digest = createHash('sha256').update(JSON.stringify(model)).digest('hex');
    expect(matricesSha256(model)).toBe(digest);
  });
});
