import { useState } from 'react';
import type { VersionDetail } from '../../../../shared/api/versions.ts';
import { ErrorAlert } from '@/components/alert';
import { Button } from '@/components/button';
import { TextField } from '@/components/field';
import { useTransitionVersion, type VersionTransition } from '../api/transition-version.ts';
import { allowedVersionActions, type VersionActor } from '../lib/version-permissions.ts';

export interface VersionActionsProps {
  version: VersionDetail;
  actor: VersionActor;
  forbidSelfApproval: boolean;
}

/**
 * Submit / approve / send back / withdraw, each shown only to a role that may use it now
 * (contract table). Sending back and withdrawing need a comment saying why.
 */
export function VersionActions({ version, actor, forbidSelfApproval }: VersionActionsProps) {
  const allowed = allowedVersionActions(actor, { state: version.state, authorId: version.authorId ?? '', forbidSelfApproval });
  const transition = useTransitionVersion(version.id);
  const [comment, setComment] = useState('');
  const needsComment = allowed.reject || allowed.withdraw;
  const act = (action: VersionTransition) => transition.mutate({ action, comment });
  if (!allowed.submit && !allowed.approve && !allowed.reject && !allowed.withdraw) {
    return <p className="text-sm text-slate-500" data-testid="no-version-actions">No review actions for your role on this version.</p>;
  }
  return (
    <div className="flex flex-col gap-3" aria-label="Version actions">
      {needsComment ? <TextField label="Comment" value={comment} onChange={(e) => setComment(e.target.value)} hint="required to send back or withdraw; kept in the history" /> : null}
      <div className="flex flex-wrap gap-2">
        {allowed.submit ? (
          <Button pending={transition.isPending && transition.variables?.action === 'submit'} onClick={() => act('submit')}>
            Submit for review
          </Button>
        ) : null}
        {allowed.approve ? (
          <Button pending={transition.isPending && transition.variables?.action === 'approve'} onClick={() => act('approve')}>
            Approve
          </Button>
        ) : null}
        {allowed.reject ? (
          <Button variant="secondary" disabled={!comment.trim()} pending={transition.isPending && transition.variables?.action === 'reject'} onClick={() => act('reject')}>
            Send back to draft
          </Button>
        ) : null}
        {allowed.withdraw ? (
          <Button variant="danger" disabled={!comment.trim()} pending={transition.isPending && transition.variables?.action === 'withdraw'} onClick={() => act('withdraw')}>
            Withdraw
          </Button>
        ) : null}
      </div>
      <ErrorAlert error={transition.error} title="Refused" />
    </div>
  );
}
