/**
 * Approve a draft window with an electronic signature (the signer's password again, meaning
 * "approved"). On success the version is effective from now and the previous one superseded.
 */
import { useState } from 'react';
import { apiFetch } from '../../lib/client/api.ts';
import SignDialog from '../shell/SignDialog.tsx';

interface Props {
  windowId: number;
  title: string;
  /** Plain-words summary of what changes (e.g. "3 limits changed against version 1"). */
  summary: string;
}

export default function WindowApprove({ windowId, title, summary }: Props) {
  const [signing, setSigning] = useState(false);
  const [done, setDone] = useState<string | null>(null);
  return (
    <div>
      <button type="button" className="btn" onClick={() => setSigning(true)} disabled={!!done}>
        Approve with signature…
      </button>
      <div aria-live="polite">{done && <p className="mt-2 font-bold">✓ {done}</p>}</div>
      {signing && (
        <SignDialog
          title={`Approve ${title}`}
          meaningOptions={['approved']}
          signLabel="Sign and approve"
          onCancel={() => setSigning(false)}
          onSign={async (password, meaning) => {
            const r = await apiFetch<{ effectiveFrom: string; version: number }>(`/api/v1/windows/${windowId}/approve`, {
              body: { password, meaning },
            });
            setSigning(false);
            setDone(`Version ${r.version} is effective from ${new Date(r.effectiveFrom).toLocaleString()}.`);
            setTimeout(() => window.location.reload(), 800);
          }}
        >
          <p>{summary}</p>
          <p className="mt-1 text-ink-soft">
            Approval makes this version effective now and supersedes the version in force. Lines and ovens running this recipe
            follow it at once.
          </p>
        </SignDialog>
      )}
    </div>
  );
}
