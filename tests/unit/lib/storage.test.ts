// Both stores through the one interface (lib/storage): the local folder and S3-compatible object storage,
// the latter against s3rver started here on a loopback port. Digests are checked against the published
// SHA-256 test vector and against node:crypto; what the S3 store wrote is read back with a plain S3 client.
import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { GetObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  contentKey,
  createStore,
  objectStore,
  putContent,
  S3Store,
  sha256OfKey,
  storeConfig,
  StorageConfigError,
  StorageError,
  StorageKeyNotFound,
  verifyStore,
  type ObjectStore,
} from '@/lib/storage';
import { PART_BYTES } from '@/lib/storage/s3';
import { fetchToScratch } from '@/lib/storage/scratch';
import { startS3Fake, type S3Fake } from '../../fixtures/storage/s3-fake';

// FIPS 180-2, appendix B.1: SHA-256("abc").
const ABC_SHA256 = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

const STORAGE_VARS = [
  'MODESHELF_STORAGE',
  'MODESHELF_UPLOADS_DIR',
  'MODESHELF_S3_BUCKET',
  'MODESHELF_S3_ENDPOINT',
  'MODESHELF_S3_REGION',
  'MODESHELF_S3_ACCESS_KEY_ID',
  'MODESHELF_S3_SECRET_ACCESS_KEY',
  'MODESHELF_S3_FORCE_PATH_STYLE',
  'MODESHELF_S3_PREFIX',
  'MODESHELF_SCRATCH_DIR',
];

function withEnv<T>(vars: Record<string, string | undefined>, fn: () => T): T {
  const saved = Object.fromEntries(STORAGE_VARS.map((k) => [k, process.env[k]]));
  for (const k of STORAGE_VARS) delete process.env[k];
  for (const [k, v] of Object.entries(vars)) if (v !== undefined) process.env[k] = v;
  try {
    return fn();
  } finally {
    for (const k of STORAGE_VARS) {
      if (saved[k] === undefined) delete process.env[k];
      else process.env[k] = saved[k];
    }
  }
}

const sha256 = (b: Buffer | string) => createHash('sha256').update(b).digest('hex');

async function readAll(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const c of stream) chunks.push(c as Buffer);
  return Buffer.concat(chunks);
}

const work = mkdtempSync(path.join(os.tmpdir(), 'modeshelf-storage-test-'));
let fake: S3Fake;
const stores: Record<'local' | 's3', ObjectStore> = {} as never;

beforeAll(async () => {
  fake = await startS3Fake();
  stores.local = withEnv({ MODESHELF_UPLOADS_DIR: path.join(work, 'uploads') }, () => createStore(storeConfig()));
  stores.s3 = withEnv({ ...fake.env, MODESHELF_S3_PREFIX: 'quillmere/' }, () => createStore(storeConfig()));
});

afterAll(async () => {
  await (stores.s3 as S3Store | undefined)?.close();
  await fake?.close();
  rmSync(work, { recursive: true, force: true });
});

function tempFile(bytes: Buffer | string): string {
  const file = path.join(work, `in-${randomBytes(6).toString('hex')}`);
  writeFileSync(file, bytes);
  return file;
}

describe.each(['local', 's3'] as const)('the %s store', (kind) => {
  const store = () => stores[kind];

  it('puts, reads whole and as a stream, reports existence and size, and deletes', async () => {
    const key = `notes/kiln-${kind}.txt`;
    expect(await store().exists(key)).toBe(false);
    await store().put(key, 'Quillmere Kilnworks: kiln wall, zone 3\n');
    expect(await store().exists(key)).toBe(true);
    expect(await store().size(key)).toBe(39);
    expect((await store().get(key)).toString('utf8')).toBe('Quillmere Kilnworks: kiln wall, zone 3\n');
    expect((await readAll(await store().getStream(key))).toString('utf8')).toBe('Quillmere Kilnworks: kiln wall, zone 3\n');
    await store().put(key, Buffer.from('replaced'));
    expect((await store().get(key)).toString('utf8')).toBe('replaced');
    await store().delete(key);
    expect(await store().exists(key)).toBe(false);
    await expect(store().delete(key)).resolves.toBeUndefined();
  });

  it('streams a file larger than several multipart parts in and out unchanged', async () => {
    const bytes = randomBytes(2 * PART_BYTES + 123_457);
    const key = `big/${kind}.bin`;
    // A stream of small chunks, as an upload arrives.
    const chunks = Array.from({ length: Math.ceil(bytes.length / 65536) }, (_, i) => bytes.subarray(i * 65536, (i + 1) * 65536));
    await store().put(key, Readable.from(chunks));
    expect(await store().size(key)).toBe(bytes.length);
    expect(sha256(await readAll(await store().getStream(key)))).toBe(sha256(bytes));
    await store().delete(key);
  });

  it('keys content by SHA-256 and stores the same bytes once', async () => {
    expect(contentKey(ABC_SHA256)).toBe(`sha256/ba/${ABC_SHA256}`);
    expect(sha256OfKey(contentKey(ABC_SHA256))).toBe(ABC_SHA256);
    expect(sha256OfKey('sha256/ab/' + ABC_SHA256)).toBeNull();

    const first = tempFile('abc');
    const placed = await putContent(first, ABC_SHA256, store());
    expect(placed).toEqual({ storageKey: `sha256/ba/${ABC_SHA256}`, placed: true });
    expect(existsSync(first)).toBe(false);
    const second = tempFile('abc');
    expect(await putContent(second, ABC_SHA256, store())).toEqual({ storageKey: placed.storageKey, placed: false });
    expect(existsSync(second)).toBe(false);
    expect(sha256(await store().get(placed.storageKey))).toBe(ABC_SHA256);
    await store().delete(placed.storageKey);
  });

  it('names the missing key when asked for an object it does not hold', async () => {
    const key = contentKey(sha256('never stored'));
    for (const attempt of [() => store().get(key), () => store().getStream(key), () => store().size(key)]) {
      const err = await attempt().then(
        () => null,
        (e: unknown) => e,
      );
      expect(err).toBeInstanceOf(StorageKeyNotFound);
      expect((err as Error).message).toContain(key);
      expect((err as Error).message).toContain(store().location);
    }
  });

  it('passes the start-up check, leaving nothing behind', async () => {
    await verifyStore(store());
    expect(await store().exists('health')).toBe(false);
    if (kind === 'local') expect(existsSync(path.join(work, 'uploads', 'health')) ? readdirSync(path.join(work, 'uploads', 'health')) : []).toEqual([]);
  });

  it('refuses keys that are not relative names', async () => {
    for (const key of ['../outside', '/etc/passwd', 'sha256/../../x', 'a//b', '', 'a b']) {
      await expect(store().put(key, 'x')).rejects.toThrow(StorageError);
      await expect(store().exists(key)).rejects.toThrow(/not a storage key/);
    }
  });

  it('leaves no object behind when the body fails part way', async () => {
    const key = `broken/${kind}.bin`;
    const failing = new Readable({
      read() {
        this.push(randomBytes(PART_BYTES + 1000));
        this.destroy(new Error('the browser went away'));
      },
    });
    await expect(store().put(key, failing)).rejects.toThrow(StorageError);
    expect(await store().exists(key)).toBe(false);
  });

  it('hands a worker a whole, checked copy through fetchToScratch', async () => {
    const bytes = Buffer.from(`%%MatrixMarket matrix array real general\n1 1\n-${kind.length}.5\n`);
    const digest = sha256(bytes);
    const { storageKey } = await putContent(tempFile(bytes), digest, store());
    const scratch = path.join(work, `scratch-${kind}`);
    const local = await fetchToScratch(storageKey, { store: store(), dir: scratch });
    expect(readFileSync(local)).toEqual(bytes);
    if (kind === 'local') {
      // The local store is on this machine: read where it is, nothing copied.
      expect(local).toBe(path.join(work, 'uploads', storageKey));
      expect(existsSync(scratch)).toBe(false);
    } else {
      expect(local).toBe(path.join(scratch, storageKey));
    }
    await store().delete(storageKey);
    const gone = await fetchToScratch(storageKey, { store: store(), dir: path.join(work, `scratch2-${kind}`) }).catch((e: unknown) => e);
    expect(gone).toBeInstanceOf(StorageKeyNotFound);
  });
});

describe('the local store', () => {
  it('keeps the uploads folder layout <uploads>/sha256/ab/abcd…', async () => {
    const { storageKey } = await putContent(tempFile('abc'), ABC_SHA256, stores.local);
    expect(readFileSync(path.join(work, 'uploads', 'sha256', 'ba', ABC_SHA256), 'utf8')).toBe('abc');
    await stores.local.delete(storageKey);
  });
});

describe('the S3 store', () => {
  const raw = () =>
    new S3Client({
      region: 'us-east-1',
      endpoint: fake.endpoint,
      forcePathStyle: true,
      credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' },
    });

  it('writes into the bucket under its prefix, where any S3 client finds the object', async () => {
    const { storageKey } = await putContent(tempFile('abc'), ABC_SHA256, stores.s3);
    const client = raw();
    const listed = await client.send(new ListObjectsV2Command({ Bucket: fake.bucket, Prefix: 'quillmere/' }));
    expect((listed.Contents ?? []).map((c) => c.Key)).toContain(`quillmere/sha256/ba/${ABC_SHA256}`);
    const got = await client.send(new GetObjectCommand({ Bucket: fake.bucket, Key: `quillmere/${storageKey}` }));
    expect(await got.Body!.transformToString()).toBe('abc');
    client.destroy();
    await stores.s3.delete(storageKey);
  });

  it('refuses a fetched copy whose bytes do not hash to its key, and keeps none of it', async () => {
    const key = contentKey(ABC_SHA256);
    const client = raw();
    await client.send(new PutObjectCommand({ Bucket: fake.bucket, Key: `quillmere/${key}`, Body: 'abd' }));
    client.destroy();
    const scratch = path.join(work, 'scratch-damaged');
    const err = await fetchToScratch(key, { store: stores.s3, dir: scratch }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StorageError);
    expect((err as Error).message).toMatch(/does not match its digest/);
    expect(existsSync(path.join(scratch, key))).toBe(false);
    expect(readdirSync(path.join(scratch, 'tmp'))).toEqual([]);
    await stores.s3.delete(key);
  });

  it('clears temporary files that a stopped fetch left in the scratch folder, and only old ones', async () => {
    const scratch = path.join(work, 'scratch-stale');
    mkdirSync(path.join(scratch, 'tmp'), { recursive: true });
    const stale = path.join(scratch, 'tmp', '1-stopped.fetch');
    const recent = path.join(scratch, 'tmp', '2-running.fetch');
    writeFileSync(stale, 'half a matrix');
    writeFileSync(recent, 'another half');
    const day = new Date(Date.now() - 24 * 3600 * 1000);
    utimesSync(stale, day, day);
    const { storageKey } = await putContent(tempFile('abc'), ABC_SHA256, stores.s3);
    expect(readFileSync(await fetchToScratch(storageKey, { store: stores.s3, dir: scratch }), 'utf8')).toBe('abc');
    expect(readdirSync(path.join(scratch, 'tmp'))).toEqual(['2-running.fetch']);
    await stores.s3.delete(storageKey);
  });

  it('says which bucket is missing', async () => {
    const store = new S3Store({ ...(stores.s3 as S3Store).config, bucket: 'no-such-quillmere-bucket' });
    await expect(store.get('sha256/ab/x')).rejects.toThrow(/no-such-quillmere-bucket/);
    await expect(verifyStore(store)).rejects.toThrow(/store check could not write to s3:\/\/no-such-quillmere-bucket\/.*does not exist/);
    await store.close();
  });
});

describe('choosing the store by environment', () => {
  it('is the local uploads folder when nothing is set', () => {
    const cfg = withEnv({ MODESHELF_UPLOADS_DIR: path.join(work, 'elsewhere') }, () => storeConfig());
    expect(cfg).toEqual({ kind: 'local', root: path.join(work, 'elsewhere') });
    expect(withEnv({}, () => objectStore().kind)).toBe('local');
  });

  it('reads the S3 settings, defaulting to path-style addressing with a custom endpoint', () => {
    const cfg = withEnv({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'kiln-models', MODESHELF_S3_ENDPOINT: 'http://10.1.2.3:9000', MODESHELF_S3_PREFIX: '/modeshelf' }, () =>
      storeConfig(),
    );
    expect(cfg).toEqual({
      kind: 's3',
      bucket: 'kiln-models',
      endpoint: 'http://10.1.2.3:9000',
      region: 'us-east-1',
      credentials: undefined,
      forcePathStyle: true,
      prefix: 'modeshelf/',
    });
    const hosted = withEnv({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'kiln-models', MODESHELF_S3_REGION: 'eu-central-1' }, () => storeConfig());
    expect(hosted).toMatchObject({ forcePathStyle: false, region: 'eu-central-1', endpoint: undefined });
  });

  it('names the variable at fault', () => {
    const fails = (vars: Record<string, string>) => {
      try {
        withEnv(vars, () => storeConfig());
      } catch (e) {
        expect(e).toBeInstanceOf(StorageConfigError);
        return (e as StorageConfigError).variable;
      }
      throw new Error('expected a refusal');
    };
    expect(fails({ MODESHELF_STORAGE: 'ftp' })).toBe('MODESHELF_STORAGE');
    expect(fails({ MODESHELF_STORAGE: 's3' })).toBe('MODESHELF_S3_BUCKET');
    expect(fails({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'Bad_Bucket' })).toBe('MODESHELF_S3_BUCKET');
    expect(fails({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'kiln', MODESHELF_S3_ENDPOINT: 'not a url' })).toBe('MODESHELF_S3_ENDPOINT');
    expect(fails({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'kiln', MODESHELF_S3_ACCESS_KEY_ID: 'x' })).toBe('MODESHELF_S3_SECRET_ACCESS_KEY');
    expect(fails({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'kiln', MODESHELF_S3_FORCE_PATH_STYLE: 'maybe' })).toBe('MODESHELF_S3_FORCE_PATH_STYLE');
    expect(fails({ MODESHELF_STORAGE: 's3', MODESHELF_S3_BUCKET: 'kiln', MODESHELF_S3_PREFIX: 'a/../b' })).toBe('MODESHELF_S3_PREFIX');
  });
});
