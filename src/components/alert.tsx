import type { ReactNode } from 'react';
import { ApiError } from '@/lib/api-client';

/** A boxed message: `error` for refusals and failures, `info` for neutral notes, `success` after an action. */
export function Alert({ tone = 'error', title, children }: { tone?: 'error' | 'info' | 'success'; title?: string; children?: ReactNode }) {
  const tones = {
    error: 'border-red-200 bg-red-50 text-red-800',
    info: 'border-slate-200 bg-white text-slate-700',
    success: 'border-accent-100 bg-accent-50 text-accent-800',
  };
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={`rounded-md border px-4 py-3 text-sm ${tones[tone]}`}>
      {title ? <p className="font-medium">{title}</p> : null}
      {children ? <div className={title ? 'mt-1' : ''}>{children}</div> : null}
    </div>
  );
}

/** The plain message for any error a query or mutation may throw. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) {
    if (error.status === 429) return error.message || 'Too many attempts. Wait a minute and try again.';
    return error.message;
  }
  if (error instanceof Error) return `Could not reach the server (${error.message}).`;
  return 'Something went wrong.';
}

/** An error alert for a failed query or mutation; renders nothing without an error. */
export function ErrorAlert({ error, title }: { error: unknown; title?: string }) {
  if (!error) return null;
  return <Alert title={title}>{errorMessage(error)}</Alert>;
}
