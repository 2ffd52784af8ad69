'use client';
// Upload of a source model, or of a new version of one: the model's particulars and its file(s), sent as
// multipart/form-data to /api/uploads/source-models, which streams them to disk, has the engine check them
// and answers with the new version (202) or with the problem and the field it concerns. Each error is shown
// beside its field; a duplicate links to the version that already holds those files.
//
// Four ways to give the files: one JSON model; the matrix files A, B, C (D and E optional); a second-order
// model's M, D, K with its force input B and output map C; or one zip archive of such files. Large models
// (above the engine's crossover, or with E) are checked and analysed on the sparse path.
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useId, useRef, useState, type FormEvent } from 'react';

type FileMode = 'json' | 'matrices' | 'second-order' | 'archive';

interface FieldError {
  message: string;
  link?: string;
}

interface UploadAnswer {
  url: string;
  version: { number: number };
}

const MATRIX_FIELDS = [
  { name: 'A', label: 'A', shape: '(n×n)', required: true },
  { name: 'B', label: 'B', shape: '(n×m)', required: true },
  { name: 'C', label: 'C', shape: '(p×n)', required: true },
  { name: 'D', label: 'D', shape: '(p×m), optional', required: false },
  { name: 'E', label: 'E', shape: '(n×n, coordinate), optional: E ẋ = A x + B u', required: false },
] as const;

/** A second-order model M q̈ + D q̇ + K q = B u, y = C [q; q̇]: its files travel in these fields. */
const SECOND_ORDER_FIELDS = [
  { name: 'mass', label: 'M, mass', shape: '(q×q)', required: true },
  { name: 'damping', label: 'D, damping', shape: '(q×q), optional', required: false },
  { name: 'stiffness', label: 'K, stiffness', shape: '(q×q)', required: true },
  { name: 'B', label: 'B, force input', shape: '(q×m)', required: true },
  { name: 'C', label: 'C, output', shape: '(p×q displacements, or p×2q with velocities)', required: true },
] as const;

/** The file fields each way of giving the files sends; the others are dropped before sending. */
const MODE_FIELDS: Record<FileMode, readonly string[]> = {
  json: ['model'],
  matrices: MATRIX_FIELDS.map((f) => f.name),
  'second-order': SECOND_ORDER_FIELDS.map((f) => f.name),
  archive: ['archive'],
};
const ALL_FILE_FIELDS = Array.from(new Set(Object.values(MODE_FIELDS).flat()));

/** Sends the form with XMLHttpRequest, whose upload events give the bytes sent so far (fetch has none). */
function send(form: FormData, onProgress: (fraction: number) => void): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', '/api/uploads/source-models');
    xhr.responseType = 'json';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => resolve({ status: xhr.status, body: xhr.response });
    xhr.onerror = () => reject(new Error('The upload did not reach the server (network error).'));
    xhr.send(form);
  });
}

export function UploadForm({ sourceModelId, modelName, defaultTimeBase }: { sourceModelId?: string; modelName?: string; defaultTimeBase?: string }) {
  const router = useRouter();
  const formRef = useRef<HTMLFormElement>(null);
  const [mode, setMode] = useState<FileMode>('json');
  const [errors, setErrors] = useState<Record<string, FieldError>>({});
  const [general, setGeneral] = useState<FieldError | null>(null);
  const [sending, setSending] = useState<number | null>(null);
  const id = useId();
  const isVersion = Boolean(sourceModelId);

  const onSubmit = async (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    setErrors({});
    setGeneral(null);
    const data = new FormData(e.currentTarget);
    // Only the files of the chosen mode travel.
    for (const f of ALL_FILE_FIELDS) if (!MODE_FIELDS[mode].includes(f)) data.delete(f);
    for (const [k, v] of [...data.entries()]) if (v instanceof File && v.size === 0 && v.name === '') data.delete(k);
    setSending(0);
    try {
      const { status, body } = await send(data, setSending);
      if (status === 202) {
        const answer = body as UploadAnswer;
        router.push(answer.url);
        return;
      }
      const error = (body as { error?: { message?: string; field?: string; link?: string } } | null)?.error;
      const shown: FieldError = { message: error?.message ?? `The server answered ${status}.`, link: error?.link };
      const known = error?.field && [...MODE_FIELDS[mode], 'name', 'description', 'timeBase', 'tags', 'notes'].includes(error.field);
      if (known) setErrors({ [error!.field!]: shown });
      else setGeneral(shown);
    } catch (err) {
      setGeneral({ message: err instanceof Error ? err.message : String(err) });
    } finally {
      setSending(null);
    }
  };

  const fieldError = (name: string) =>
    errors[name] ? (
      <p role="alert" id={`${id}-${name}-error`} className="mt-1 text-sm text-okabe-vermillion" data-testid={`error-${name}`}>
        {errors[name].message}
        {errors[name].link ? (
          <>
            {' '}
            <Link href={errors[name].link!}>Open that version</Link>
          </>
        ) : null}
      </p>
    ) : null;

  const fileInput = (name: string, label: string, accept: string, required: boolean, shape?: string) => (
    <div key={name}>
      <label htmlFor={`${id}-${name}`} className="field-label">
        {label}
        {/* matrix dimensions keep their lower-case letters */}
        {shape ? <span className="normal-case"> {shape}</span> : null}
      </label>
      <input
        id={`${id}-${name}`}
        name={name}
        type="file"
        accept={accept}
        required={required}
        aria-invalid={errors[name] ? true : undefined}
        aria-describedby={errors[name] ? `${id}-${name}-error` : undefined}
        className="field-input"
      />
      {fieldError(name)}
    </div>
  );

  return (
    <form ref={formRef} onSubmit={onSubmit} className="panel max-w-3xl space-y-4 p-5" aria-label={isVersion ? 'Upload a new version' : 'Upload a source model'} noValidate>
      {isVersion ? (
        <>
          <input type="hidden" name="sourceModelId" value={sourceModelId} />
          <p className="text-sm">
            A new version of <strong>{modelName}</strong>. Its number follows the latest one; its analysis starts as soon as it is stored.
          </p>
        </>
      ) : (
        <>
          <div>
            <label htmlFor={`${id}-name`} className="field-label">
              Name
            </label>
            <input id={`${id}-name`} name="name" required maxLength={120} className="field-input" aria-invalid={errors.name ? true : undefined} />
            {fieldError('name')}
          </div>
          <div>
            <label htmlFor={`${id}-description`} className="field-label">
              Description
            </label>
            <textarea id={`${id}-description`} name="description" rows={3} maxLength={4000} className="field-input" />
            {fieldError('description')}
          </div>
          <div className="grid gap-4 sm:grid-cols-2">
            <div>
              <label htmlFor={`${id}-timeBase`} className="field-label">
                Time unit
              </label>
              <input id={`${id}-timeBase`} name="timeBase" defaultValue={defaultTimeBase ?? 's'} maxLength={16} className="field-input num" />
              {fieldError('timeBase')}
            </div>
            <div>
              <label htmlFor={`${id}-tags`} className="field-label">
                Tags (comma-separated)
              </label>
              <input id={`${id}-tags`} name="tags" maxLength={400} placeholder="thermal, kiln" className="field-input" />
              {fieldError('tags')}
            </div>
          </div>
        </>
      )}
      <div>
        <label htmlFor={`${id}-notes`} className="field-label">
          Version notes
        </label>
        <input id={`${id}-notes`} name="notes" maxLength={2000} placeholder="Where the files come from, what changed" className="field-input" />
        {fieldError('notes')}
      </div>

      <fieldset>
        <legend className="field-label mb-1">Files</legend>
        <div role="radiogroup" aria-label="File format" className="mb-3 flex flex-wrap gap-4 text-sm">
          <label className="flex items-center gap-2">
            <input type="radio" name="fileMode" value="json" checked={mode === 'json'} onChange={() => setMode('json')} />
            One JSON file (A, B, C, D, or mass, damping, stiffness for a second-order model)
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="fileMode" value="matrices" checked={mode === 'matrices'} onChange={() => setMode('matrices')} />
            Matrix files A, B, C, D (Matrix Market .mtx or CSV)
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="fileMode" value="second-order" checked={mode === 'second-order'} onChange={() => setMode('second-order')} />
            Second-order files M, D, K with B and C (Matrix Market .mtx or CSV)
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="fileMode" value="archive" checked={mode === 'archive'} onChange={() => setMode('archive')} />
            One zip archive of the matrix files
          </label>
        </div>
        {mode === 'json' ? (
          fileInput('model', 'Model file (.json)', '.json,application/json', true)
        ) : mode === 'archive' ? (
          <>
            {fileInput('archive', 'Zip archive (.zip)', '.zip,application/zip', true)}
            <p className="mt-1 text-xs text-graphite-soft">
              Name the files inside by their matrix: A, B, C and optionally D and E (A.mtx, B.mtx, …), or M, K, B, C and optionally D for a second-order model
              (M q̈ + D q̇ + K q = B u).
            </p>
          </>
        ) : (
          <div className="grid gap-4 sm:grid-cols-2">
            {(mode === 'matrices' ? MATRIX_FIELDS : SECOND_ORDER_FIELDS).map((f) => fileInput(f.name, f.label, '.mtx,.mm,.csv,text/csv', f.required, f.shape))}
          </div>
        )}
        <p className="mt-2 text-xs text-graphite-soft">
          Models above the engine’s crossover (1000 states unless set otherwise) given as Matrix Market coordinate files, and every model with E, take the large-model path: checked and analysed
          without ever being made dense, their figures marked exact or estimated.
        </p>
      </fieldset>

      {general ? (
        <p role="alert" className="border-l-2 border-okabe-vermillion bg-sheet px-3 py-2 text-sm">
          {general.message}
          {general.link ? (
            <>
              {' '}
              <Link href={general.link}>Open it</Link>
            </>
          ) : null}
        </p>
      ) : null}

      <div className="flex items-center gap-4">
        <button type="submit" className="button-primary" disabled={sending !== null}>
          {sending !== null ? 'Uploading…' : isVersion ? 'Upload version' : 'Upload and analyse'}
        </button>
        {sending !== null ? (
          <span className="num text-sm text-graphite-soft" aria-live="polite">
            {sending < 1 ? `sending ${Math.floor(sending * 100)} %` : 'checking the model…'}
          </span>
        ) : null}
      </div>
    </form>
  );
}
