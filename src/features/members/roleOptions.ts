import { ROLE_LABELS, STUDY_ROLES } from "@shared/roles";

/** The role pickers' choices, named as the app names roles. */
export const ROLE_OPTIONS = STUDY_ROLES.map((role) => ({ value: role, label: ROLE_LABELS[role] }));
