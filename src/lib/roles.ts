import { ROLE_DESCRIPTIONS, ROLES, type Role } from "../../shared/schemas";

export const ROLE_LABELS: Record<Role, string> = {
  owner: "Owner",
  editor: "Editor",
  reviewer: "Reviewer",
  viewer: "Viewer",
};

/** Most rights first, the order people expect in a picker. */
export const ROLES_BY_RIGHTS: readonly Role[] = [...ROLES].reverse();

export { ROLE_DESCRIPTIONS };
