import { z } from "zod";
import { EmailSchema } from "./auth";

export const ROLES = ["viewer", "reviewer", "editor", "owner"] as const;
export const RoleSchema = z.enum(ROLES);
export type Role = z.infer<typeof RoleSchema>;

/** Roles in increasing order of rights: each role can do what the ones before it can. */
export function roleAtLeast(role: Role, needed: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(needed);
}

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  owner: "Manages members and the Study, and edits life cycles.",
  editor: "Edits life cycles, rates and data.",
  reviewer: "Reads everything, comments and approves.",
  viewer: "Reads everything.",
};

export const MAX_STUDY_NAME_LENGTH = 120;
export const MAX_STUDY_DESCRIPTION_LENGTH = 2000;

export const StudyCreateSchema = z.strictObject({
  name: z.string().trim().min(1, "Name the Study.").max(MAX_STUDY_NAME_LENGTH),
  description: z.string().trim().max(MAX_STUDY_DESCRIPTION_LENGTH).default(""),
});
export type StudyCreate = z.input<typeof StudyCreateSchema>;

export const StudyUpdateSchema = z
  .strictObject({
    name: z.string().trim().min(1, "Name the Study.").max(MAX_STUDY_NAME_LENGTH).optional(),
    description: z.string().trim().max(MAX_STUDY_DESCRIPTION_LENGTH).optional(),
    archived: z.boolean().optional(),
  })
  .refine((v) => Object.keys(v).length > 0, { message: "Nothing to change." });
export type StudyUpdate = z.infer<typeof StudyUpdateSchema>;

export const StudySchema = z.object({
  id: z.string(),
  name: z.string(),
  description: z.string(),
  archivedAt: z.string().nullable(),
  createdAt: z.string(),
  role: RoleSchema,
  memberCount: z.number(),
});
export type Study = z.infer<typeof StudySchema>;

export const MemberSchema = z.object({
  userId: z.string(),
  name: z.string(),
  email: z.string(),
  role: RoleSchema,
  joinedAt: z.string(),
});
export type Member = z.infer<typeof MemberSchema>;

export const MemberUpdateSchema = z.strictObject({ role: RoleSchema });
export type MemberUpdate = z.infer<typeof MemberUpdateSchema>;

export const InvitationCreateSchema = z.strictObject({
  email: EmailSchema,
  role: RoleSchema,
});
export type InvitationCreate = z.infer<typeof InvitationCreateSchema>;

export const InvitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  role: RoleSchema,
  invitedBy: z.string(),
  createdAt: z.string(),
  expiresAt: z.string(),
});
export type Invitation = z.infer<typeof InvitationSchema>;

/** What an invitation link shows before it is accepted (no sign-in needed). */
export const InvitationPreviewSchema = z.object({
  studyName: z.string(),
  role: RoleSchema,
  email: z.string(),
  invitedBy: z.string(),
  accountExists: z.boolean(),
});
export type InvitationPreview = z.infer<typeof InvitationPreviewSchema>;

export const AuditEventSchema = z.object({
  id: z.string(),
  action: z.string(),
  actorId: z.string().nullable(),
  actorName: z.string().nullable(),
  summary: z.string(),
  /** The life cycle the event concerns, if any. */
  lifeCycleId: z.string().nullable(),
  createdAt: z.string(),
});
export type AuditEvent = z.infer<typeof AuditEventSchema>;

export const MailMessageSchema = z.object({
  id: z.string(),
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  text: z.string(),
  links: z.array(z.string()),
  receivedAt: z.string(),
});
export type MailMessage = z.infer<typeof MailMessageSchema>;
