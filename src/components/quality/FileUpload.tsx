/**
 * Attach photos, spectra or reports to a test. The browser checks the size first (5 MB); the
 * server decides the type from the file's content (PNG, JPEG, PDF, UTF-8 text or CSV) and says
 * why it refuses anything else. Upload progress is shown.
 */
import { useRef, useState, type SyntheticEvent } from 'react';
import { MAX_UPLOAD_BYTES } from '../../lib/shared/file-types.ts';

export default function FileUpload({ testId }: { testId: number }) {
  const input = useRef<HTMLInputElement>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [msg, setMsg] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);

  function submit(e: SyntheticEvent) {
    e.preventDefault();
    const file = input.current?.files?.[0];
    if (!file) return setMsg({ kind: 'error', text: 'Choose a file.' });
    if (file.size > MAX_UPLOAD_BYTES)
      return setMsg({ kind: 'error', text: `${file.name} is ${(file.size / 1048576).toFixed(1)} MB; the limit is 5 MB.` });
    const body = new FormData();
    body.append('file', file);
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/v1/quality/tests/${testId}/files`);
    xhr.upload.onprogress = (ev) => ev.lengthComputable && setProgress(Math.round((ev.loaded / ev.total) * 100));
    xhr.onload = () => {
      setProgress(null);
      if (xhr.status === 201) {
        setMsg({ kind: 'ok', text: `${file.name} attached.` });
        setTimeout(() => window.location.reload(), 500);
      } else {
        let text = `The upload was refused (HTTP ${xhr.status}).`;
        try {
          const p = JSON.parse(xhr.responseText) as { title?: string; detail?: string };
          text = `${p.title ?? 'Refused'}: ${p.detail ?? ''}`;
        } catch {
          /* not JSON */
        }
        setMsg({ kind: 'error', text });
      }
    };
    xhr.onerror = () => {
      setProgress(null);
      setMsg({ kind: 'error', text: 'The upload failed (network).' });
    };
    setMsg(null);
    setProgress(0);
    xhr.send(body);
  }

  return (
    <form onSubmit={submit} className="space-y-2" aria-label="Attach a file">
      <label htmlFor={`file-${testId}`}>Attach a photo, spectrum or report (PNG, JPEG, PDF, CSV or text; at most 5 MB)</label>
      <input
        id={`file-${testId}`}
        ref={input}
        type="file"
        accept=".png,.jpg,.jpeg,.pdf,.csv,.txt,image/png,image/jpeg,application/pdf,text/csv,text/plain"
      />
      <div className="flex items-center gap-3">
        <button className="btn" disabled={progress !== null}>
          {progress !== null ? `Uploading… ${progress} %` : 'Upload'}
        </button>
        {progress !== null && <progress max={100} value={progress} className="w-40" aria-label="Upload progress" />}
      </div>
      {msg && (
        <p
          role={msg.kind === 'error' ? 'alert' : 'status'}
          className={
            msg.kind === 'error'
              ? 'rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm'
              : 'rounded border-l-4 border-lacquer bg-lacquer-light/60 p-2 text-sm'
          }
        >
          <strong>{msg.kind === 'error' ? '✕ ' : '✓ '}</strong>
          {msg.text}
        </p>
      )}
    </form>
  );
}
