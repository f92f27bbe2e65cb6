import { useRef, useState, type DragEvent } from 'react';
import type { UploadFramesResponse } from '../../../../shared/api/frames.ts';
import { Alert, ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { SelectField, TextAreaField, TextField } from '@/components/field';
import { fieldErrorsFromDetails } from '@/lib/api-client';
import { useUploadFrames, type UploadFieldValues } from '../api/upload-frames.ts';

export interface FrameUploadProps {
  instrumentId: string;
  onUploaded?: (response: UploadFramesResponse) => void;
}

const EMPTY: UploadFieldValues = { kind: 'signal' };

/**
 * Drop zone and file picker for one or many frames (TIFF stacks give one frame per page), with
 * the metadata the lab records. The server decodes every file with the engine before it stores
 * anything; a refused file shows the engine's message and nothing is kept.
 */
export function FrameUpload({ instrumentId, onUploaded }: FrameUploadProps) {
  const [files, setFiles] = useState<File[]>([]);
  const [fields, setFields] = useState<UploadFieldValues>(EMPTY);
  const [dragging, setDragging] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const upload = useUploadFrames(instrumentId);
  const fieldErrors = upload.error && 'details' in upload.error ? fieldErrorsFromDetails((upload.error as { details?: unknown }).details) : {};
  const set = (key: keyof UploadFieldValues) => (e: { target: { value: string } }) => setFields((f) => ({ ...f, [key]: e.target.value }));

  const onDrop = (event: DragEvent<HTMLDivElement>) => {
    event.preventDefault();
    setDragging(false);
    setFiles((current) => [...current, ...Array.from(event.dataTransfer.files)]);
  };

  const submit = () => {
    const takenAt = fields.takenAt ? new Date(fields.takenAt).toISOString() : undefined;
    upload.mutate(
      { files, fields: { ...fields, takenAt } },
      {
        onSuccess: (response) => {
          setFiles([]);
          if (input.current) input.current.value = '';
          onUploaded?.(response);
        },
      },
    );
  };

  return (
    <form
      className="flex flex-col gap-4"
      aria-label="Upload frames"
      onSubmit={(e) => {
        e.preventDefault();
        submit();
      }}
    >
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={onDrop}
        className={`flex flex-col items-center gap-2 rounded-lg border-2 border-dashed px-4 py-6 text-center text-sm ${
          dragging ? 'border-accent-500 bg-accent-50' : 'border-slate-300 bg-slate-50'
        }`}
        data-testid="drop-zone"
      >
        <p className="text-slate-700">Drop camera frames here (TIFF, PNG, FITS; several at once), or</p>
        <label className="cursor-pointer font-medium text-accent-700 hover:underline">
          choose files
          <input
            ref={input}
            type="file"
            multiple
            className="sr-only"
            aria-label="Frame files"
            accept=".tif,.tiff,.png,.fits,.fit,.fts,image/tiff,image/png"
            onChange={(e) => setFiles((current) => [...current, ...Array.from(e.target.files ?? [])])}
          />
        </label>
        {files.length > 0 ? (
          <ul className="mt-2 w-full max-w-md text-left text-slate-700" aria-label="Files to upload">
            {files.map((f, i) => (
              <li key={`${f.name}-${i}`} className="flex justify-between gap-2 border-b border-slate-200 py-1">
                <span className="truncate">{f.name}</span>
                <span className="text-slate-500 tabular-nums">{(f.size / 1024).toFixed(0)} KiB</span>
              </li>
            ))}
          </ul>
        ) : null}
      </div>
      <div className="grid grid-cols-2 gap-3 md:grid-cols-4">
        <SelectField label="Kind" value={fields.kind ?? 'signal'} onChange={set('kind')} options={[{ value: 'signal', label: 'signal' }, { value: 'dark', label: 'dark' }]} error={fieldErrors.kind} />
        <TextField label="Taken at" type="datetime-local" value={fields.takenAt ?? ''} onChange={set('takenAt')} hint="blank: from the file's tags, else now" error={fieldErrors.takenAt} />
        <TextField label="Exposure (s)" type="number" step="any" value={fields.exposureS ?? ''} onChange={set('exposureS')} error={fieldErrors.exposureS} />
        <TextField label="Accumulations" type="number" step="1" value={fields.accumulations ?? ''} onChange={set('accumulations')} error={fieldErrors.accumulations} />
        <TextField label="Gas or target" value={fields.target ?? ''} onChange={set('target')} error={fieldErrors.target} />
        <TextField label="Pressure (mbar)" type="number" step="any" value={fields.pressureMbar ?? ''} onChange={set('pressureMbar')} error={fieldErrors.pressureMbar} />
        <TextField label="Driver wavelength (nm)" type="number" step="any" value={fields.driverNm ?? ''} onChange={set('driverNm')} error={fieldErrors.driverNm} />
        <SelectField label="Parity" value={fields.parity ?? ''} onChange={set('parity')} options={[{ value: '', label: '—' }, { value: 'odd', label: 'odd orders' }, { value: 'all', label: 'all orders' }]} error={fieldErrors.parity} />
        <TextField label="Filters" value={fields.filters ?? ''} onChange={set('filters')} hint="comma-separated, e.g. Al, Zr:200" error={fieldErrors.filters} />
        <TextField label="Scan variable" value={fields.scanVariable ?? ''} onChange={set('scanVariable')} error={fieldErrors.scanVariable} />
        <TextField label="Scan value" type="number" step="any" value={fields.scanValue ?? ''} onChange={set('scanValue')} error={fieldErrors.scanValue} />
        <TextField label="Tags" value={fields.tags ?? ''} onChange={set('tags')} hint="comma-separated" error={fieldErrors.tags} />
      </div>
      <TextAreaField label="Notes" value={fields.notes ?? ''} onChange={set('notes')} error={fieldErrors.notes} />
      {upload.isError ? <ErrorAlert error={upload.error} title="The upload was refused; nothing was stored" /> : null}
      {upload.isSuccess ? (
        <Alert tone="success" title="Uploaded">
          {upload.data.frames.length} frame{upload.data.frames.length === 1 ? '' : 's'} stored.
        </Alert>
      ) : null}
      <div className="flex gap-2">
        <Button type="submit" pending={upload.isPending} disabled={files.length === 0}>
          Upload {files.length > 0 ? `${files.length} file${files.length === 1 ? '' : 's'}` : ''}
        </Button>
        {files.length > 0 ? (
          <Button
            variant="ghost"
            onClick={() => {
              setFiles([]);
              if (input.current) input.current.value = '';
            }}
          >
            Clear files
          </Button>
        ) : null}
      </div>
    </form>
  );
}
