import { useState } from 'react';
import type { OutboxMail } from '../../../../shared/api/audit.ts';
import { EmptyState } from '@/components/page';

/** Links in a plain-text mail, so the reader can follow them (invitation links above all). */
export function linksIn(text: string): string[] {
  return Array.from(new Set(text.match(/https?:\/\/[^\s<>"')]+/g) ?? []));
}

/** The captured mails on the left, the open one on the right (text and its links). */
export function OutboxView({ mails }: { mails: OutboxMail[] }) {
  const [openId, setOpenId] = useState<string | null>(null);
  if (mails.length === 0) return <EmptyState>No mail captured yet. Invitations and notices appear here.</EmptyState>;
  const open = mails.find((m) => m.id === openId) ?? null;

  return (
    <div className="grid gap-4 lg:grid-cols-[minmax(0,22rem)_minmax(0,1fr)]">
      <ul className="divide-y divide-slate-100 self-start overflow-hidden rounded-lg border border-slate-200 bg-white" aria-label="Captured mails">
        {mails.map((mail) => (
          <li key={mail.id}>
            <button
              type="button"
              onClick={() => setOpenId(mail.id)}
              aria-current={mail.id === openId ? 'true' : undefined}
              className={`block w-full px-4 py-3 text-left hover:bg-slate-50 ${mail.id === openId ? 'bg-accent-50' : ''}`}
            >
              <span className="block truncate text-sm font-medium text-slate-900">{mail.subject}</span>
              <span className="block truncate text-xs text-slate-500">
                to {mail.to} · {new Date(mail.receivedAt).toLocaleString()}
              </span>
            </button>
          </li>
        ))}
      </ul>
      {open ? (
        <article className="rounded-lg border border-slate-200 bg-white p-5" aria-label="Open mail">
          <h2 className="text-lg font-semibold text-slate-900">{open.subject}</h2>
          <dl className="mt-2 grid grid-cols-[4rem_1fr] gap-y-1 text-sm text-slate-600">
            <dt>From</dt>
            <dd>{open.from}</dd>
            <dt>To</dt>
            <dd>{open.to}</dd>
            <dt>Received</dt>
            <dd>{new Date(open.receivedAt).toLocaleString()}</dd>
          </dl>
          <pre className="mt-4 rounded-md bg-slate-50 p-4 font-sans text-sm whitespace-pre-wrap text-slate-800">{open.text}</pre>
          {linksIn(open.text).length ? (
            <div className="mt-4">
              <h3 className="text-sm font-semibold text-slate-700">Links in this mail</h3>
              <ul className="mt-1 list-inside list-disc text-sm">
                {linksIn(open.text).map((href) => (
                  <li key={href}>
                    <a href={href} className="break-all text-accent-700 hover:underline" data-testid="mail-link">
                      {href}
                    </a>
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
        </article>
      ) : (
        <p className="self-center text-sm text-slate-500">Choose a mail to read it.</p>
      )}
    </div>
  );
}
