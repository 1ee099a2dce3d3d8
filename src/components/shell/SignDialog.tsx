/**
 * Electronic-signature dialog for signed actions (approve limits, approve a window, release a
 * hold, disposition). The signer re-enters the password and chooses the meaning of the
 * signature; the server checks it with `signWithPassword` and stores name, date-time and
 * meaning with the record (US 21 CFR Part 11, §11.50 and §11.200).
 *
 * Usage (in an island):
 *   {signing && <SignDialog title="Approve control limits" meaningOptions={['approved']}
 *     onSign={async (password, meaning) => { await apiFetch(url, { body: { ...data, password, meaning } }); }}
 *     onCancel={() => setSigning(false)} />}
 * `onSign` should throw (e.g. the ApiError of apiFetch) when the server refuses; the dialog
 * shows the message and stays open. On success the caller closes it (usually by unmounting).
 */
import { useEffect, useId, useRef, useState, type ReactNode, type SubmitEvent } from 'react';
import { ApiError } from '../../lib/client/api.ts';

export interface SignDialogProps {
  /** What is being signed, e.g. "Approve control limits for Line 1 bath viscosity". */
  title: string;
  /** The meanings the signer may choose from, e.g. ['approved', 'rejected']. Empty → free text. */
  meaningOptions: string[];
  onSign(password: string, meaning: string): Promise<void>;
  onCancel(): void;
  /** Optional summary of the record being signed, shown above the password. */
  children?: ReactNode;
  /** Allow a typed meaning besides the options (off by default). */
  allowOtherMeaning?: boolean;
  /** Label of the confirm button (default "Sign"). */
  signLabel?: string;
}

const OTHER = '__other__';

export default function SignDialog({
  title,
  meaningOptions,
  onSign,
  onCancel,
  children,
  allowOtherMeaning = false,
  signLabel = 'Sign',
}: SignDialogProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const id = useId();
  const freeText = meaningOptions.length === 0;
  const [choice, setChoice] = useState<string>(meaningOptions.length === 1 ? meaningOptions[0]! : '');
  const [other, setOther] = useState('');
  const [password, setPassword] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
    return () => {
      if (d?.open) d.close();
    };
  }, []);

  const meaning = (freeText || choice === OTHER ? other : choice).trim();

  async function submit(e: SubmitEvent<HTMLFormElement>) {
    e.preventDefault();
    if (!meaning) return setError('Choose the meaning of your signature.');
    if (!password) return setError('Enter your password.');
    setBusy(true);
    setError(null);
    try {
      await onSign(password, meaning);
    } catch (err) {
      setPassword('');
      if (err instanceof ApiError) {
        const field = err.errors.find((f) => f.path === 'password' || f.path === 'meaning');
        setError(field?.message ?? err.detail ?? err.title);
      } else {
        setError(err instanceof Error ? err.message : 'The signature was not recorded.');
      }
    } finally {
      setBusy(false);
    }
  }

  return (
    <dialog
      ref={ref}
      aria-labelledby={`${id}-title`}
      aria-describedby={`${id}-explain`}
      onCancel={(e) => {
        e.preventDefault();
        if (!busy) onCancel();
      }}
      className="w-full max-w-md rounded-md border border-slate-line bg-white p-0 text-ink shadow-xl backdrop:bg-slate-deep/50"
    >
      <form onSubmit={submit} className="space-y-4 p-5" noValidate>
        <div>
          <h2 id={`${id}-title`} className="flex items-center gap-2">
            <svg aria-hidden="true" width="18" height="18" viewBox="0 0 24 24" fill="none" stroke="currentColor" strokeWidth="2">
              <path d="M3 21h18M5 17l10-10 3 3-10 10H5v-3z" />
            </svg>
            {title}
          </h2>
          <p id={`${id}-explain`} className="mt-1 text-sm text-ink-soft">
            Your signature is recorded with your name, the date and time, and its meaning (21 CFR Part 11).
          </p>
        </div>
        {children && <div className="rounded border border-slate-line bg-slate-panel/50 p-3 text-sm">{children}</div>}
        {freeText ? (
          <div>
            <label htmlFor={`${id}-other`}>Meaning of this signature</label>
            <input id={`${id}-other`} value={other} onChange={(e) => setOther(e.target.value)} maxLength={200} required />
          </div>
        ) : (
          <div>
            <label htmlFor={`${id}-meaning`}>Meaning of this signature</label>
            <select id={`${id}-meaning`} value={choice} onChange={(e) => setChoice(e.target.value)} required>
              {meaningOptions.length > 1 && <option value="">Choose…</option>}
              {meaningOptions.map((m) => (
                <option key={m} value={m}>
                  {m}
                </option>
              ))}
              {allowOtherMeaning && <option value={OTHER}>Other (type it)…</option>}
            </select>
            {choice === OTHER && (
              <input
                className="mt-2"
                aria-label="Meaning, in your words"
                value={other}
                onChange={(e) => setOther(e.target.value)}
                maxLength={200}
              />
            )}
          </div>
        )}
        <div>
          <label htmlFor={`${id}-password`}>Your password</label>
          <input
            id={`${id}-password`}
            type="password"
            autoComplete="current-password"
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            autoFocus
            required
          />
        </div>
        {error && (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 text-sm">
            <strong>Not signed.</strong> {error}
          </p>
        )}
        <div className="flex justify-end gap-2">
          <button type="button" className="btn-quiet" onClick={onCancel} disabled={busy}>
            Cancel
          </button>
          <button type="submit" className="btn" disabled={busy} aria-busy={busy}>
            {busy ? 'Signing…' : signLabel}
          </button>
        </div>
      </form>
    </dialog>
  );
}
