/**
 * Every client URL of Stagewright. The router's route object takes its
 * patterns from `routePatterns`; links and redirects build URLs with `paths`.
 * Nothing else writes a URL by hand.
 */
import { generatePath } from "react-router";

export const routePatterns = {
  home: "/",
  signIn: "/sign-in",
  signUp: "/sign-up",
  confirmSignUp: "/sign-up/confirm",
  forgotPassword: "/forgot-password",
  resetPassword: "/reset-password",
  invitation: "/invitations/:token",
  studies: "/studies",
  study: "/studies/:studyId",
  lifeCycle: "/life-cycles/:lifeCycleId",
  fieldData: "/studies/:studyId/field-data",
  dataset: "/datasets/:datasetId",
  report: "/life-cycles/:lifeCycleId/report",
  apiGuide: "/api-guide",
  settings: "/settings",
  mailOutbox: "/mail",
  unsubscribe: "/unsubscribe",
  studyActivity: "/studies/:studyId/activity",
} as const;

function withSearch(pathname: string, search: Record<string, string | null | undefined>): string {
  const params = new URLSearchParams();
  for (const [key, value] of Object.entries(search)) if (value) params.set(key, value);
  const query = params.toString();
  return query ? `${pathname}?${query}` : pathname;
}

export const paths = {
  home: () => routePatterns.home,
  /** `next`: where to go after signing in (an in-app path). */
  signIn: (options: { next?: string | null } = {}) => withSearch(routePatterns.signIn, { next: options.next }),
  /** `invitation`: token of the invitation the new account accepts on creation. */
  signUp: (options: { next?: string | null; invitation?: string | null } = {}) =>
    withSearch(routePatterns.signUp, { invitation: options.invitation, next: options.next }),
  confirmSignUp: (token?: string) => withSearch(routePatterns.confirmSignUp, { token }),
  forgotPassword: () => routePatterns.forgotPassword,
  resetPassword: (token?: string) => withSearch(routePatterns.resetPassword, { token }),
  invitation: (token: string) => generatePath(routePatterns.invitation, { token }),
  studies: () => routePatterns.studies,
  study: (studyId: string) => generatePath(routePatterns.study, { studyId }),
  lifeCycle: (lifeCycleId: string) => generatePath(routePatterns.lifeCycle, { lifeCycleId }),
  fieldData: (studyId: string) => generatePath(routePatterns.fieldData, { studyId }),
  dataset: (datasetId: string) => generatePath(routePatterns.dataset, { datasetId }),
  /** `snapshot`: report that snapshot instead of the saved state. */
  report: (lifeCycleId: string, options: { snapshot?: string | null } = {}) =>
    withSearch(generatePath(routePatterns.report, { lifeCycleId }), { snapshot: options.snapshot }),
  apiGuide: () => routePatterns.apiGuide,
  settings: () => routePatterns.settings,
  mailOutbox: () => routePatterns.mailOutbox,
  studyActivity: (studyId: string) => generatePath(routePatterns.studyActivity, { studyId }),
  /** A life cycle's editor on one tab, with a thread, snapshot or comparison in view. */
  lifeCycleTab: (lifeCycleId: string, tab: string, extra: Record<string, string> = {}) =>
    withSearch(generatePath(routePatterns.lifeCycle, { lifeCycleId }), { tab, ...extra }),
};

/**
 * The `next` parameter, if it is a path inside this app. Anything else
 * (another origin, `//host`, `javascript:`) is dropped so a crafted link
 * cannot send someone off-site after they sign in.
 */
export function safeNext(raw: string | null | undefined): string | null {
  if (!raw || !raw.startsWith("/") || raw.startsWith("//") || raw.startsWith("/\\")) return null;
  return raw;
}
