// A study's members and pending invitations, read by the Members screen and by the thread
// composer (who can be mentioned).
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { z } from "zod";
import type { memberListSchema, pendingInvitationSchema } from "@shared/schemas/studies";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { studyApiPath } from "./paths";

export type MemberList = z.infer<typeof memberListSchema>;
export type PendingInvitation = z.infer<typeof pendingInvitationSchema>;

/** GET /api/studies/:studyId/members: members and pending invitations. */
export const membersQuery = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.members(studyId),
    queryFn: ({ signal }) => api.get<MemberList>(studyApiPath(studyId, "/members"), signal),
  });

export const useMembers = (studyId: string) => useQuery(membersQuery(studyId));
