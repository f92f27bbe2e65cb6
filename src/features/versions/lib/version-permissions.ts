/**
 * Which version actions to show, mirroring the contract's table (the server decides; this only
 * hides buttons a role cannot use).
 */
import type { Role } from '../../../../shared/api/members.ts';

export type VersionState = 'draft' | 'in_review' | 'approved' | 'superseded' | 'withdrawn';

export interface VersionActor {
  userId: string;
  role: Role | null;
  isAdmin: boolean;
}

export interface VersionFacts {
  state: VersionState;
  authorId: string;
  forbidSelfApproval: boolean;
}

const isOwnerLike = (a: VersionActor) => a.isAdmin || a.role === 'owner';
const isScientistLike = (a: VersionActor) => isOwnerLike(a) || a.role === 'scientist';

/** The actions this user may take on this version now. */
export function allowedVersionActions(actor: VersionActor, v: VersionFacts): { submit: boolean; approve: boolean; reject: boolean; withdraw: boolean; edit: boolean } {
  const isAuthor = actor.userId === v.authorId;
  const authorOrOwner = isOwnerLike(actor) || (isAuthor && isScientistLike(actor));
  const mayReview = isOwnerLike(actor) && !(v.forbidSelfApproval && isAuthor);
  return {
    submit: v.state === 'draft' && authorOrOwner,
    edit: v.state === 'draft' && authorOrOwner,
    approve: v.state === 'in_review' && mayReview,
    reject: v.state === 'in_review' && mayReview,
    withdraw:
      v.state !== 'withdrawn' &&
      (isOwnerLike(actor) || (isAuthor && actor.role === 'scientist' && (v.state === 'draft' || v.state === 'in_review'))),
  };
}

/** Whether the user may run the workbench and save drafts on an instrument. */
export function mayRecalibrate(actor: VersionActor): boolean {
  return isScientistLike(actor);
}

/** Display colours of the states: one accent plus neutral and warning tones. */
export const STATE_STYLE: Record<VersionState, { label: string; className: string; colour: string }> = {
  draft: { label: 'draft', className: 'bg-slate-100 text-slate-700 ring-slate-300', colour: '#94a3b8' },
  in_review: { label: 'in review', className: 'bg-amber-50 text-amber-800 ring-amber-300', colour: '#f59e0b' },
  approved: { label: 'approved', className: 'bg-accent-100 text-accent-800 ring-accent-500', colour: '#0d9488' },
  superseded: { label: 'superseded', className: 'bg-indigo-50 text-indigo-700 ring-indigo-200', colour: '#6366f1' },
  withdrawn: { label: 'withdrawn', className: 'bg-red-50 text-red-700 ring-red-200 line-through', colour: '#dc2626' },
};
