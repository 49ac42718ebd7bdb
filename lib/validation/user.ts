import { z } from 'zod';
import { ROLES } from '@/lib/auth/roles';
import { emailSchema, labelSchema, uuidSchema } from './common';

export const passwordSchema = z.string().min(12, 'At least 12 characters.').max(200, 'At most 200 characters.');

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Required.').max(200),
});

export const userCreateSchema = z.strictObject({
  email: emailSchema,
  name: labelSchema(),
  role: z.enum(ROLES),
  password: passwordSchema.optional(),
  teamIds: z.array(uuidSchema).max(50).default([]),
  outbreakIds: z.array(uuidSchema).max(50).default([]),
});
export type UserCreateInput = z.infer<typeof userCreateSchema>;

export const userUpdateSchema = z.strictObject({
  name: labelSchema().optional(),
  role: z.enum(ROLES).optional(),
  active: z.boolean().optional(),
  teamIds: z.array(uuidSchema).max(50).optional(),
  outbreakIds: z.array(uuidSchema).max(50).optional(),
});
export type UserUpdateInput = z.infer<typeof userUpdateSchema>;
