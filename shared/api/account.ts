/**
 * Request bodies and answers of the mail-backed account flows — invitations, password reset,
 * notification settings and the development mailbox — shared by the server (validation) and the
 * client (types).
 */
import { z } from 'zod';
import { passwordMinLength } from './auth';
import { teamRoleSchema, type TeamRole } from './teams';

const email = z
  .string({ error: 'Enter an e-mail address.' })
  .trim()
  .toLowerCase()
  .max(320, { error: 'An e-mail address has at most 320 characters.' })
  .pipe(z.email({ error: 'Enter a valid e-mail address.' }));

/** A token from a mailed link: 32 random bytes in base64url (43 characters). */
const token = z
  .string({ error: 'The link is incomplete.' })
  .trim()
  .regex(/^[A-Za-z0-9_-]{43}$/, { error: 'The link is incomplete or was changed. Open it again from the e-mail.' });

const newPassword = z
  .string({ error: 'Choose a password.' })
  .min(passwordMinLength, { error: `A password has at least ${passwordMinLength} characters.` })
  .max(1024, { error: 'A password has at most 1024 characters.' });

// ── Invitations ────────────────────────────────────────────────────────────────────────────────

export const createInvitationRequest = z.object({ email, role: teamRoleSchema });
export type CreateInvitationRequest = z.infer<typeof createInvitationRequest>;

export const invitationTokenRequest = z.object({ token });
export type InvitationTokenRequest = z.infer<typeof invitationTokenRequest>;

export const invitationSignupRequest = z.object({
  token,
  name: z
    .string({ error: 'Enter your name.' })
    .trim()
    .min(1, { error: 'Enter your name.' })
    .max(200, { error: 'A name has at most 200 characters.' }),
  password: newPassword,
});
export type InvitationSignupRequest = z.infer<typeof invitationSignupRequest>;

/** An invitation as the team's owners see it. */
export interface TeamInvitation {
  id: string;
  email: string;
  role: TeamRole;
  invitedBy: { id: string; name: string } | null;
  createdAt: string;
  expiresAt: string;
  /** `expired`: the link no longer works; the owner may invite again or withdraw it. */
  status: 'pending' | 'expired';
}

/** What the holder of an invitation link learns before accepting it. */
export interface InvitationPreview {
  teamName: string;
  role: TeamRole;
  email: string;
  invitedByName: string | null;
  expiresAt: string;
  /** An account with the invited address exists (sign in and accept) or not (sign up from the link). */
  accountExists: boolean;
}

export interface AcceptedInvitation {
  team: { id: string; name: string; role: TeamRole };
}

// ── Password reset ─────────────────────────────────────────────────────────────────────────────

export const passwordResetRequest = z.object({ email });
export type PasswordResetRequest = z.infer<typeof passwordResetRequest>;

export const passwordResetTokenRequest = z.object({ token });

export const passwordResetCompleteRequest = z.object({ token, password: newPassword });
export type PasswordResetCompleteRequest = z.infer<typeof passwordResetCompleteRequest>;

/** The one answer to a reset request, whether or not the address has an account. */
export const passwordResetRequestedMessage =
  'If an account uses this address, a message with a link to choose a new password is on its way. The link works once, for one hour.';

// ── Notification settings ──────────────────────────────────────────────────────────────────────

/** Mail a user may switch off. Invitations and password-reset links are always sent. */
export const notificationKinds = ['review_requested', 'review_verdict', 'invitation_accepted'] as const;
export type NotificationKind = (typeof notificationKinds)[number];

export type NotificationPreferences = Record<NotificationKind, boolean>;

export const notificationPreferencesPatch = z
  .object({
    review_requested: z.boolean({ error: 'Choose on or off.' }),
    review_verdict: z.boolean({ error: 'Choose on or off.' }),
    invitation_accepted: z.boolean({ error: 'Choose on or off.' }),
  })
  .partial()
  .strict();
export type NotificationPreferencesPatch = z.infer<typeof notificationPreferencesPatch>;

export interface AccountInfo {
  user: { id: string; name: string; email: string };
  preferences: NotificationPreferences;
  /** May open the development mailbox (site admins, when the local mail server is in use). */
  mailbox: boolean;
}

// ── Development mailbox ────────────────────────────────────────────────────────────────────────

export const mailboxListQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(50),
  /** Only messages to this address (substring, case-insensitive). */
  to: z.string().trim().max(320).optional(),
});

export interface MailboxSummary {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
}

export interface MailboxMessage extends MailboxSummary {
  text: string | null;
  /** Sanitized HTML part (no scripts, no outside resources), or null for plain-text messages. */
  html: string | null;
  messageId: string | null;
  /** The message as received, headers and MIME parts included. */
  raw: string;
}
