import { z } from 'zod';
import { ROLES } from '@/lib/auth/roles';
import { emailSchema, labelSchema, uuidSchema } from './common';
import { passwordSchema } from './user';

/** The token in an invitation or reset link: 32 random bytes, base64url (43 characters). */
export const mailTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/, 'This link is not complete. Open it again from the message.');

/**
 * An invitation: the address, the person's name, their role and where they work. Field officers
 * work in teams; coordinators and supervisors are responsible for outbreaks.
 */
export const invitationInputSchema = z
  .strictObject({
    email: emailSchema,
    name: labelSchema(),
    role: z.enum(ROLES),
    teamIds: z.array(uuidSchema).max(50).default([]),
    outbreakIds: z.array(uuidSchema).max(50).default([]),
  })
  .superRefine((v, ctx) => {
    if (v.role === 'field' && v.teamIds.length === 0) ctx.addIssue({ code: 'custom', path: ['teamIds'], message: 'Choose at least one team for a field officer.' });
    if ((v.role === 'coordinator' || v.role === 'supervisor') && v.outbreakIds.length === 0) {
      ctx.addIssue({ code: 'custom', path: ['outbreakIds'], message: 'Choose at least one outbreak (through one of its teams).' });
    }
  });
export type InvitationInput = z.infer<typeof invitationInputSchema>;

export const invitationAcceptSchema = z.strictObject({
  token: mailTokenSchema,
  password: passwordSchema,
  /** The invitee may correct the name the inviter typed. */
  name: labelSchema().optional(),
});
export type InvitationAcceptInput = z.infer<typeof invitationAcceptSchema>;

export const tokenQuerySchema = z.object({ token: mailTokenSchema });

export const resetRequestSchema = z.strictObject({ email: emailSchema });
export type ResetRequestInput = z.infer<typeof resetRequestSchema>;

export const resetConfirmSchema = z.strictObject({ token: mailTokenSchema, password: passwordSchema });
export type ResetConfirmInput = z.infer<typeof resetConfirmSchema>;

export const mailListQuerySchema = z.object({
  to: emailSchema.optional(),
  limit: z.coerce.number().int().min(1).max(1000).optional(),
});

/** The answer to every reset request, known address or not (no account discovery). */
export const RESET_REQUEST_ANSWER = {
  ok: true,
  message: 'If an active account uses that address, a reset link is on its way. It works once, for one hour.',
} as const;
