/**
 * The one route object of the client (React Router data mode). Pages load
 * lazily, one chunk per route; loaders here only fetch what a page needs
 * before it shows and redirect where the session says so.
 */
import { type LoaderFunctionArgs, type RouteObject, createBrowserRouter, redirect } from "react-router";
import { datasetQueryOptions } from "../api/field-data";
import { lifeCycleQueryOptions, lifeCyclesQueryOptions } from "../api/life-cycles";
import { membersQueryOptions } from "../api/members";
import { queryClient } from "../api/query-client";
import { sessionQueryOptions } from "../api/session";
import { studiesQueryOptions, studyQueryOptions } from "../api/studies";
import { AppShell } from "./app-shell";
import { NotFoundPage } from "./not-found";
import { paths, routePatterns, safeNext } from "./paths";
import { RequireSession } from "./require-session";
import { AppLoading, RootError, RouteError } from "./route-error";

const session = () => queryClient.ensureQueryData(sessionQueryOptions());

/** Sign-in, sign-up and forgot-password are for people who are not signed in. */
async function guestOnly({ request }: LoaderFunctionArgs) {
  const { user } = await session();
  if (!user) return null;
  const search = new URL(request.url).searchParams;
  const invitation = search.get("invitation");
  throw redirect(invitation ? paths.invitation(invitation) : (safeNext(search.get("next")) ?? paths.studies()));
}

export const routes: RouteObject[] = [
  {
    id: "root",
    path: routePatterns.home,
    loader: async () => {
      await session(); // also sets the sw_csrf cookie every write needs
      return null;
    },
    Component: AppShell,
    ErrorBoundary: RootError,
    HydrateFallback: AppLoading,
    children: [
      {
        // Errors of any page show inside the app frame.
        ErrorBoundary: RouteError,
        children: [
          {
            index: true,
            loader: async () => {
              const { user } = await session();
              throw redirect(user ? paths.studies() : paths.signIn());
            },
          },
          {
            path: routePatterns.signIn,
            loader: guestOnly,
            lazy: () => import("./sign-in").then((m) => ({ Component: m.SignInPage })),
          },
          {
            path: routePatterns.signUp,
            loader: guestOnly,
            lazy: () => import("./sign-up").then((m) => ({ Component: m.SignUpPage })),
          },
          {
            path: routePatterns.confirmSignUp,
            lazy: () => import("./confirm-sign-up").then((m) => ({ Component: m.ConfirmSignUpPage })),
          },
          {
            path: routePatterns.forgotPassword,
            loader: guestOnly,
            lazy: () => import("./forgot-password").then((m) => ({ Component: m.ForgotPasswordPage })),
          },
          {
            path: routePatterns.resetPassword,
            lazy: () => import("./reset-password").then((m) => ({ Component: m.ResetPasswordPage })),
          },
          {
            path: routePatterns.invitation,
            lazy: () => import("./accept-invitation").then((m) => ({ Component: m.AcceptInvitationPage })),
          },
          {
            // Public like the document it shows: a script's author may read it before signing up.
            path: routePatterns.apiGuide,
            lazy: () => import("./api-guide").then((m) => ({ Component: m.ApiGuidePage })),
          },
          {
            path: routePatterns.mailOutbox,
            lazy: () => import("./mail-outbox").then((m) => ({ Component: m.MailOutboxPage })),
          },
          {
            path: routePatterns.unsubscribe,
            lazy: () => import("./unsubscribe").then((m) => ({ Component: m.UnsubscribePage })),
          },
          {
            Component: RequireSession,
            children: [
              {
                path: routePatterns.studies,
                loader: () => {
                  void queryClient.prefetchQuery(studiesQueryOptions());
                  return null;
                },
                lazy: () => import("./studies").then((m) => ({ Component: m.StudiesPage })),
              },
              {
                path: routePatterns.study,
                loader: async ({ params }) => {
                  const studyId = params.studyId ?? "";
                  const { user } = await session();
                  if (!user) return null; // RequireSession sends the person to sign-in
                  void queryClient.prefetchQuery(lifeCyclesQueryOptions(studyId));
                  void queryClient.prefetchQuery(membersQueryOptions(studyId));
                  // Wait for the Study itself: a 404 shows the route's error page.
                  await queryClient.ensureQueryData(studyQueryOptions(studyId));
                  return null;
                },
                lazy: () => import("./study").then((m) => ({ Component: m.StudyPage })),
              },
              {
                path: routePatterns.studyActivity,
                loader: async ({ params }) => {
                  const { user } = await session();
                  if (!user) return null;
                  await queryClient.ensureQueryData(studyQueryOptions(params.studyId ?? ""));
                  return null;
                },
                lazy: () => import("./study-activity").then((m) => ({ Component: m.StudyActivityPage })),
              },
              {
                // The editor and its diagram and chart code load only when a life cycle is opened.
                path: routePatterns.lifeCycle,
                loader: async ({ params }) => {
                  const lifeCycleId = params.lifeCycleId ?? "";
                  const { user } = await session();
                  if (!user) return null;
                  // Always the newest version, so edits start from it; a 404 or 403 shows the
                  // route's error page. The Study (for the role) follows the life cycle.
                  const record = await queryClient.fetchQuery({ ...lifeCycleQueryOptions(lifeCycleId), staleTime: 0 });
                  await queryClient.ensureQueryData(studyQueryOptions(record.studyId));
                  return null;
                },
                lazy: () => import("./life-cycle-editor").then((m) => ({ Component: m.LifeCycleEditorPage })),
              },
              {
                path: routePatterns.fieldData,
                loader: async ({ params }) => {
                  const { user } = await session();
                  if (!user) return null;
                  await queryClient.ensureQueryData(studyQueryOptions(params.studyId ?? ""));
                  return null;
                },
                lazy: () => import("./field-data").then((m) => ({ Component: m.FieldDataPage })),
              },
              {
                // Charts and analyses load only when a dataset is opened.
                path: routePatterns.dataset,
                loader: async ({ params }) => {
                  const { user } = await session();
                  if (!user) return null;
                  const d = await queryClient.fetchQuery({ ...datasetQueryOptions(params.datasetId ?? ""), staleTime: 0 });
                  await queryClient.ensureQueryData(studyQueryOptions(d.studyId));
                  return null;
                },
                lazy: () => import("./dataset").then((m) => ({ Component: m.DatasetPage })),
                },
                {
                path: routePatterns.report,
                lazy: () => import("./report").then((m) => ({ Component: m.ReportPage })),
              },
              {
                path: routePatterns.settings,
                lazy: () => import("./settings").then((m) => ({ Component: m.SettingsPage })),
              },
            ],
          },
          { path: "*", Component: NotFoundPage },
        ],
      },
    ],
  },
];

export const router = createBrowserRouter(routes);
