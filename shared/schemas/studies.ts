import { z } from "zod";
import { STUDY_ROLES } from "../roles";
import { findUnit } from "../timescale/lookup";
import { emailSchema } from "./auth";
import { isoDateSchema, oneLine, uuidSchema, wellFormed } from "./common";
import { boundaryMaSchema } from "./outcomes";

export const studyRoleSchema = z.enum(STUDY_ROLES, { message: `Role must be one of ${STUDY_ROLES.join(", ")}` });

const studyNameSchema = z.string({ message: "Name is required" }).trim().min(1, "Name is required").max(160, "Name must have at most 160 characters").check(oneLine("Name"));
const studyDescriptionSchema = z.string({ message: "Description must be text" }).trim().max(4000, "Description must have at most 4,000 characters").check(wellFormed("Description"));

export const studyCreateSchema = z
  .strictObject({
    name: studyNameSchema,
    description: studyDescriptionSchema.default(""),
    suggestedCodebook: z
      .boolean({ message: "suggestedCodebook must be true or false" })
      .default(false)
      .meta({ description: "Start the codebook from the five suggested traits (environment, life habit, feeding mode, body size, geographic range); default: an empty codebook" }),
  })
  .meta({ id: "StudyCreate" });
export type StudyCreateInput = z.input<typeof studyCreateSchema>;

/**
 * The study's main boundary as a person sets it: the base of a unit of the time scale, or an age.
 * The Boundary screen opens there and the modern comparison starts from a run that tests it.
 */
export const mainBoundaryInputSchema = z
  .strictObject({
    unit: z
      .string({ message: "Unit must be the name of a unit of the time scale" })
      .trim()
      .min(1, "Unit must be the name of a unit of the time scale")
      .max(80, "Unit must have at most 80 characters")
      .refine((name) => findUnit(name) !== undefined, "Unit is not a unit of the time scale")
      .optional()
      .meta({ description: "A unit of the time scale whose base is the boundary, e.g. Turonian" }),
    boundaryMa: boundaryMaSchema.optional().meta({ description: "Or a custom boundary age in Ma" }),
  })
  .superRefine((b, ctx) => {
    if ((b.unit === undefined) === (b.boundaryMa === undefined)) ctx.addIssue({ code: "custom", path: ["unit"], message: "Give either a unit of the time scale or a boundary age in Ma" });
  })
  .meta({ id: "MainBoundaryInput" });
export type MainBoundaryInput = z.input<typeof mainBoundaryInputSchema>;

export const mainBoundarySchema = z
  .object({
    boundaryMa: z.number().meta({ description: "Boundary age in Ma" }),
    unit: z.string().nullable().meta({ description: "The unit of the time scale it was chosen as, when it was chosen by name" }),
    windowMyr: z.number().nullable().meta({ description: "The window the run used, when it gave one; null: the default window" }),
    source: z.enum(["study", "run"]).meta({ description: "study: set on the study's overview; run: the crisis boundary of the study's newest run (newer than any choice on the overview)" }),
    runId: z.uuid().nullable(),
    runName: z.string().nullable(),
    setAt: isoDateSchema,
  })
  .meta({ id: "MainBoundary" });
export type MainBoundary = z.infer<typeof mainBoundarySchema>;

/** Only the given fields change (no defaults here: `.partial()` of the create schema would empty a description left out). */
export const studyUpdateSchema = z
  .strictObject({
    name: studyNameSchema.optional(),
    description: studyDescriptionSchema.optional(),
    mainBoundary: mainBoundaryInputSchema.nullable().optional().meta({ description: "The study's main boundary; null clears the choice (the newest run's crisis boundary then counts)" }),
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
    mainBoundary: mainBoundarySchema.nullable().meta({ description: "The boundary the study is about: the latest of the choice on the overview and the newest run's crisis boundary; null when neither exists" }),
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
