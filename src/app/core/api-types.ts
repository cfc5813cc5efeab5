// The client's door to the REST DTOs in shared/api/ (see DEVELOPERS.md, "REST API").
export { ROLES, ROLE_RANK, roleAtLeast } from '../../../shared/api/types';
export type {
  AcceptInvitationResponse,
  ActivityEvent,
  ActivityPage,
  AuthResponse,
  BenchSummary,
  CapturedMail,
  Invitation,
  InvitationPreview,
  Member,
  PublicConfig,
  Role,
  User,
} from '../../../shared/api/types';
export { ErrorCode } from '../../../shared/api/errors';
