/** Roles, members and invitations. */
import { z } from 'zod';

/** Per-instrument roles, strongest first. Site admin is a user flag, not a role. */
export const roles = ['owner', 'scientist', 'student', 'viewer'] as const;
export const roleSchema = z.enum(roles, { error: 'role must be one of owner, scientist, student, viewer' });
export type Role = z.infer<typeof roleSchema>;

export const emailSchema = z
  .string({ error: 'email is required' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'email must be an e-mail address' }).max(254, { message: 'email is too long' }));

export const passwordSchema = z
  .string({ error: 'password is required' })
  .min(10, { message: 'password must be at least 10 characters' })
  .max(200, { message: 'password must be at most 200 characters' });

export const nameSchema = z
  .string({ error: 'name is required' })
  .trim()
  .min(1, { message: 'name must not be empty' })
  .max(200, { message: 'name must be at most 200 characters' });

/** POST /api/instruments/:id/invitations */
export const createInvitationSchema = z.object({ email: emailSchema, role: roleSchema });
export type CreateInvitationInput = z.infer<typeof createInvitationSchema>;

/**
 * POST /api/invitations/:token/accept. `name` and `password` are required when the invitation
 * creates a new account; a signed-in user whose e-mail matches may send `{}`.
 */
export const acceptInvitationSchema = z.object({
  name: nameSchema.optional(),
  password: passwordSchema.optional(),
});
export type AcceptInvitationInput = z.infer<typeof acceptInvitationSchema>;

/** PATCH /api/instruments/:id/members/:userId */
export const updateMemberSchema = z.object({ role: roleSchema });
export type UpdateMemberInput = z.infer<typeof updateMemberSchema>;

/** One row of GET /api/instruments/:id/members */
export interface Member {
  userId: string;
  email: string;
  name: string;
  role: Role;
  createdAt: string;
}

/** An invitation still waiting, as listed to owners (no token). */
export interface PendingInvitation {
  id: string;
  email: string;
  role: Role;
  expiresAt: string;
  createdAt: string;
}

/** GET /api/invitations/:token: what the invitee sees before accepting. */
export interface InvitationPreview {
  email: string;
  role: Role;
  instrumentId: string;
  instrumentName: string;
  invitedByName: string;
  expiresAt: string;
  /** True when an account with this e-mail exists: accept then only adds the membership (sign in first). */
  accountExists: boolean;
}

/** 201 of POST /api/instruments/:id/invitations. The token travels only by mail. */
export interface InvitationCreated {
  id: string;
  email: string;
  role: Role;
  expiresAt: string;
}

/**
 * GET /api/instruments/:id/members. `invitations` (pending, unexpired) is filled only for the
 * instrument's owners and site admins; other members get an empty list.
 */
export interface MembersResponse {
  members: Member[];
  invitations: PendingInvitation[];
}

/**
 * 200 of POST /api/invitations/:token/accept. When the invitation created the account, the new
 * user is signed in (new session): use this `csrfToken` from now on.
 */
export interface AcceptInvitationResult {
  user: { id: string; email: string; name: string; isAdmin: boolean };
  instrumentId: string;
  role: Role;
  accountCreated: boolean;
  csrfToken: string;
}
