import { z } from 'zod';
import { ROLES } from '../permissions.ts';

export const emailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .max(254, 'An e-mail address has at most 254 characters.')
  .email('Enter a valid e-mail address.');

/** A new password: long enough to resist guessing, short enough to hash. */
export const newPasswordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.');

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password.').max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const inviteUserSchema = z.object({
  email: emailSchema,
  displayName: z.string().trim().min(1, 'Enter a name.').max(120),
  role: z.enum(ROLES),
});
export type InviteUserInput = z.infer<typeof inviteUserSchema>;

export const updateUserSchema = z
  .object({
    role: z.enum(ROLES).optional(),
    disabled: z.boolean().optional(),
    displayName: z.string().trim().min(1).max(120).optional(),
  })
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change.');
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

export const requestResetSchema = z.object({ email: emailSchema });

export const completeTokenSchema = z.object({
  token: z.string().min(20).max(200),
  password: newPasswordSchema,
});
export type CompleteTokenInput = z.infer<typeof completeTokenSchema>;

export const changePasswordSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(200),
  newPassword: newPasswordSchema,
});

export const userIdParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});

/** What the client receives about a user. */
export interface UserDto {
  id: number;
  email: string;
  displayName: string;
  role: (typeof ROLES)[number];
  status: 'active' | 'invited' | 'disabled';
  createdAt: string;
  permissions: { edit: boolean };
}

/** What `/api/auth/me` returns: the user and what the UI may offer. */
export interface SessionDto {
  user: UserDto;
  can: {
    manageUsers: boolean;
    readSentMail: boolean;
    editEquipment: boolean;
    editStudies: boolean;
    signStudies: boolean;
  };
}
