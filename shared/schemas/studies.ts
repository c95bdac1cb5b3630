import { z } from "zod";
import { STUDY_ROLES } from "../roles";
import { emailSchema } from "./auth";
import { isoDateSchema, oneLine, uuidSchema, wellFormed } from "./common";

export const studyRoleSchema = z.enum(STUDY_ROLES, { message: `Role must be one of ${STUDY_ROLES.join(", ")}` });

const studyNameSchema = z.string({ message: "Name is required" }).trim().min(1, "Name is required").max(160, "Name must have at most 160 characters").check(oneLine("Name"));
const studyDescriptionSchema = z.string({ message: "Description must be text" }).trim().max(4000, "Description must have at most 4,000 characters").check(wellFormed("Description"));

export const studyCreateSchema = z
  .strictObject({
    name: studyNameSchema,
    description: studyDescriptionSchema.default(""),
  })
  .meta({ id: "StudyCreate" });
export type StudyCreateInput = z.input<typeof studyCreateSchema>;

/** Only the given fields change (no defaults here: `.partial()` of the create schema would empty a description left out). */
export const studyUpdateSchema = z
  .strictObject({
    name: studyNameSchema.optional(),
    description: studyDescriptionSchema.optional(),
  })
  .meta({ id: "StudyUpdate" });
export type StudyUpdateInput = z.input<typeof studyUpdateSchema>;

export const studySchema = z
  .object({
    id: z.uuid(),
    name: z.string(),
    description: z.string(),
    role: studyRoleSchema,
    memberCount: z.number().int(),
    createdAt: isoDateSchema,
    updatedAt: isoDateSchema,
  })
  .meta({ id: "Study" });
export type Study = z.infer<typeof studySchema>;

export const studyListSchema = z.object({ studies: z.array(studySchema) }).meta({ id: "StudyList" });

export const memberSchema = z
  .object({ userId: z.uuid(), name: z.string(), email: z.string(), role: studyRoleSchema, joinedAt: isoDateSchema })
  .meta({ id: "Member" });
export type Member = z.infer<typeof memberSchema>;

export const pendingInvitationSchema = z
  .object({ id: z.uuid(), email: z.string(), role: studyRoleSchema, expiresAt: isoDateSchema, createdAt: isoDateSchema })
  .meta({ id: "PendingInvitation" });

export const memberListSchema = z
  .object({ members: z.array(memberSchema), invitations: z.array(pendingInvitationSchema) })
  .meta({ id: "MemberList" });

export const memberParamsSchema = z.object({ studyId: uuidSchema, userId: uuidSchema });

export const memberUpdateSchema = z.strictObject({ role: studyRoleSchema }).meta({ id: "MemberUpdate" });

export const invitationCreateSchema = z.strictObject({ email: emailSchema, role: studyRoleSchema }).meta({ id: "InvitationCreate" });
export type InvitationCreateInput = z.input<typeof invitationCreateSchema>;

export const invitationTokenParamsSchema = z.object({ token: z.string().min(16, "The invitation link is incomplete") });

/** What the invitation page shows before the person accepts. */
export const invitationPreviewSchema = z
  .object({ studyName: z.string(), role: studyRoleSchema, email: z.string(), invitedBy: z.string().nullable(), expiresAt: isoDateSchema })
  .meta({ id: "InvitationPreview" });
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;

export const invitationAcceptedSchema = z.object({ studyId: z.uuid(), role: studyRoleSchema }).meta({ id: "InvitationAccepted" });
