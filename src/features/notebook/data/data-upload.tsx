import { useId, useRef, useState, type FormEvent } from 'react';
import { DATASET_MAX_BYTES, tableNameSchema } from '@shared/api/notebook';
import { buttonClass } from '@/components/ui/button';
import { compactControlClass } from '@/components/ui/input';
import { Field } from '@/components/ui/field';

/** Suggest a table name from a file name: "Orchard plots 2026.csv" → "Orchard_plots_2026". */
export function tableNameFromFile(fileName: string): string {
  const base = fileName.replace(/\.[^.]*$/, '').replace(/[^A-Za-z0-9_]+/g, '_').replace(/^_+|_+$/g, '');
  const named = /^[A-Za-z]/.test(base) ? base : `t_${base}`;
  return named.slice(0, 40) || 'data';
}

export interface DataUploadProps {
  busy: boolean;
  /** Server message on a refused file (names the row and column). */
  error: string | null;
  onUpload: (file: File, name: string) => void;
}

/** Choose a CSV file and the table name the model will bind with `table <name>`. */
export function DataUpload({ busy, error, onUpload }: DataUploadProps) {
  const fileRef = useRef<HTMLInputElement>(null);
  const uid = useId();
  const [file, setFile] = useState<File | null>(null);
  const [name, setName] = useState('');
  const [localError, setLocalError] = useState<string | null>(null);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!file) return setLocalError('Choose a CSV file first.');
    if (file.size > DATASET_MAX_BYTES) return setLocalError(`The file is ${(file.size / 1048576).toFixed(1)} MB; the limit is ${DATASET_MAX_BYTES / 1048576} MB.`);
    const r = tableNameSchema.safeParse(name);
    if (!r.success) return setLocalError(`Table name: ${r.error.issues[0].message}`);
    setLocalError(null);
    onUpload(file, r.data);
  };

  const shown = localError ?? error;
  return (
    <form onSubmit={submit} className="flex flex-col gap-2" aria-label="Upload a CSV file">
      <div className="flex flex-wrap items-end gap-3">
        <Field htmlFor={`${uid}-file`} label={`CSV file (header row first, up to ${DATASET_MAX_BYTES / 1048576} MB)`}>
          <input
            id={`${uid}-file`}
            data-testid="csv-file"
            ref={fileRef}
            type="file"
            accept=".csv,text/csv"
            className="text-sm"
            onChange={(e) => {
              const f = e.target.files?.[0] ?? null;
              setFile(f);
              if (f && !name) setName(tableNameFromFile(f.name));
            }}
          />
        </Field>
        <Field htmlFor={`${uid}-name`} label="Table name">
          <input id={`${uid}-name`} className={compactControlClass} style={{ width: '12rem' }} value={name} onChange={(e) => setName(e.target.value)} />
        </Field>
        <button type="submit" className={buttonClass('slack', 'xs')} disabled={busy}>
          {busy ? 'Reading…' : 'Upload'}
        </button>
      </div>
      {shown && (
        <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert" data-testid="upload-error">
          {shown}
        </p>
      )}
      <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">Models bind this table with <span className="font-mono tabular-nums">table {name || 'name'}</span>.</p>
    </form>
  );
}
