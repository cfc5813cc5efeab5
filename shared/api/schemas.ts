/**
 * Request-body schemas (zod), shared so the client can show the same messages the server sends.
 * Each message says what to fix.
 */
import { z } from 'zod';
import { safeText, type TextAllowance } from './safe-text';
import { ROLES } from './types';

export { safeText, unsafeTextProblem, type TextAllowance } from './safe-text';

/** bcrypt only looks at the first 72 bytes of a password, so we refuse longer ones instead of truncating. */
export const PASSWORD_MIN_LENGTH = 8;
export const PASSWORD_MAX_BYTES = 72;

/** Every text field follows the one text rule (safe-text.ts): no control characters, no direction controls. */
function text(requiredMessage: string, allow: TextAllowance = {}) {
  return safeText(requiredMessage, allow);
}

export const emailField = text('Enter an e-mail address.')
  .trim()
  .toLowerCase()
  .max(254, 'Use an e-mail address of at most 254 characters.')
  .email('Enter a valid e-mail address, like name@example.org.');

export const newPasswordField = text('Choose a password.')
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters for the password.`)
  .refine(
    (value) => new TextEncoder().encode(value).length <= PASSWORD_MAX_BYTES,
    `Use a shorter password: at most ${PASSWORD_MAX_BYTES} bytes (fewer characters if it has accents or symbols).`,
  );

export const displayNameField = text('Enter the name others should see.')
  .trim()
  .min(1, 'Enter the name others should see.')
  .max(80, 'Use a name of at most 80 characters.');

export const roleField = z.enum(ROLES, { error: `Choose a role: ${ROLES.join(', ')}.` });

export const benchNameField = text('Give the bench a name.')
  .trim()
  .min(1, 'Give the bench a name.')
  .max(80, 'Use a bench name of at most 80 characters.');

export const benchDescriptionField = text('Send the description as text.', { lineBreaks: true })
  .trim()
  .max(500, 'Use a description of at most 500 characters.');

export const signUpSchema = z.object({
  email: emailField,
  password: newPasswordField,
  displayName: displayNameField,
  /** Production only: the one-time code from the server log that makes this first account the admin. */
  setupCode: text('Send the setup code as text.').trim().max(64, 'The setup code has at most 64 characters.').optional(),
});
export type SignUpRequest = z.input<typeof signUpSchema>;

export const signInSchema = z.object({
  email: emailField,
  password: text('Enter your password.').min(1, 'Enter your password.'),
});
export type SignInRequest = z.input<typeof signInSchema>;

export const changePasswordSchema = z.object({
  currentPassword: text('Enter your current password.').min(1, 'Enter your current password.'),
  newPassword: newPasswordField,
});
export type ChangePasswordRequest = z.input<typeof changePasswordSchema>;

/** Deleting one's own account: the current password and the account's e-mail typed again as confirmation. */
export const deleteAccountSchema = z.object({
  password: text('Enter your password.').min(1, 'Enter your password.'),
  confirmEmail: text('Type your e-mail address to confirm.')
    .trim()
    .toLowerCase()
    .min(1, 'Type your e-mail address to confirm.'),
});
export type DeleteAccountRequest = z.input<typeof deleteAccountSchema>;

export const resetRequestSchema = z.object({ email: emailField });
export type ResetRequest = z.input<typeof resetRequestSchema>;

export const resetConfirmSchema = z.object({
  token: text('The reset link is incomplete: open the link from the e-mail again.').min(
    1,
    'The reset link is incomplete: open the link from the e-mail again.',
  ),
  newPassword: newPasswordField,
});
export type ResetConfirmRequest = z.input<typeof resetConfirmSchema>;

export const createBenchSchema = z.object({
  name: benchNameField,
  description: benchDescriptionField.optional(),
});
export type CreateBenchRequest = z.input<typeof createBenchSchema>;

export const updateBenchSchema = z
  .object({ name: benchNameField.optional(), description: benchDescriptionField.optional() })
  .refine((body) => body.name !== undefined || body.description !== undefined, {
    message: 'Send a new name or a new description.',
    path: ['name'],
  });
export type UpdateBenchRequest = z.input<typeof updateBenchSchema>;

export const updateMemberSchema = z.object({ role: roleField });
export type UpdateMemberRequest = z.input<typeof updateMemberSchema>;

export const createInvitationSchema = z.object({ email: emailField, role: roleField });
export type CreateInvitationRequest = z.input<typeof createInvitationSchema>;

export const pageQuerySchema = z.object({
  limit: z.coerce
    .number({ error: 'Give limit as a whole number.' })
    .int('Give limit as a whole number.')
    .min(1, 'Give a limit of at least 1.')
    .max(200, 'Give a limit of at most 200.')
    .default(50),
  offset: z.coerce
    .number({ error: 'Give offset as a whole number.' })
    .int('Give offset as a whole number.')
    .min(0, 'Give an offset of 0 or more.')
    .default(0),
});
export type PageQuery = z.output<typeof pageQuerySchema>;
