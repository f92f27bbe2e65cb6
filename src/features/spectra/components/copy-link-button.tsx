import { useState } from 'react';
import { Button } from '@/components/button';

/** Copies this page's address (the URL is the stable link); shows the address when the clipboard is refused. */
export function CopyLinkButton() {
  const [state, setState] = useState<'idle' | 'copied' | 'failed'>('idle');
  const href = typeof window === 'undefined' ? '' : window.location.href;
  return (
    <span className="inline-flex items-center gap-2">
      <Button
        variant="secondary"
        onClick={() => {
          navigator.clipboard
            .writeText(window.location.href)
            .then(() => setState('copied'))
            .catch(() => setState('failed'));
        }}
      >
        Copy link
      </Button>
      {state === 'copied' ? (
        <span className="text-sm text-accent-800" role="status">
          Link copied.
        </span>
      ) : null}
      {state === 'failed' ? <input aria-label="Link to this page" readOnly value={href} className="w-80 rounded border border-slate-300 px-2 py-1 text-xs" onFocus={(e) => e.currentTarget.select()} /> : null}
    </span>
  );
}
