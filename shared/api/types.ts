/** Data transfer objects of the REST API (see DEVELOPERS.md, "REST API"). Ids are UUID strings, dates ISO strings. */

export const ROLES = ['owner', 'coach', 'member', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

/** Higher number = more rights. */
export const ROLE_RANK: Readonly<Record<Role, number>> = { viewer: 0, member: 1, coach: 2, owner: 3 };

export function roleAtLeast(role: Role, minimum: Role): boolean {
  return ROLE_RANK[role] >= ROLE_RANK[minimum];
}

export interface User {
  id: string;
  email: string;
  displayName: string;
  isAdmin: boolean;
  createdAt: string;
}

export interface AuthResponse {
  token: string;
  user: User;
}

export interface BenchSummary {
  id: string;
  name: string;
  description: string;
  /** The caller's effective role (an instance admin who is not a member acts as owner). */
  role: Role;
  memberCount: number;
  createdAt: string;
}

export interface Member {
  userId: string;
  email: string;
  displayName: string;
  role: Role;
  joinedAt: string;
}

export interface Invitation {
  id: string;
  email: string;
  role: Role;
  /** Display name of the person who sent it (null when that account was deleted). */
  invitedBy: string | null;
  createdAt: string;
  expiresAt: string;
}

/** What anyone holding an invitation link may see before accepting it. */
export interface InvitationPreview {
  benchName: string;
  role: Role;
  email: string;
  invitedBy: string | null;
  expiresAt: string;
  /** Whether an account with the invited e-mail exists (so the page can offer sign-in or sign-up). */
  accountExists: boolean;
}

export interface AcceptInvitationResponse {
  benchId: string;
}

export interface ActivityEvent {
  id: string;
  kind: string;
  actor: { id: string; displayName: string } | null;
  summary: string;
  createdAt: string;
}

export interface ActivityPage {
  items: ActivityEvent[];
  total: number;
}

export interface PublicConfig {
  devMode: boolean;
  /** Only in development, when the demo seed is on. */
  demoSignIn?: { email: string; password: string };
  maxUploadBytes: number;
}

export interface CapturedMail {
  id: string;
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
}
