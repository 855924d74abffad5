import { Link, Navigate, isRouteErrorResponse, useLocation, useRouteError } from "react-router";
import { isApiError } from "../api/client";
import { Button, buttonClasses } from "../components/ui/button";
import { NotFoundContent } from "./not-found";
import { paths } from "./paths";

type Explained = { title: string; message: string; reload?: boolean };

function explain(error: unknown): Explained {
  if (isApiError(error)) {
    switch (error.status) {
      case 0:
      case 502:
      case 504:
        return {
          title: "Stagewright cannot reach its server",
          message: "The server may be restarting, or your connection may be down. Try again in a moment.",
          reload: true,
        };
      case 403:
        return { title: "Your role does not allow this", message: error.message };
      case 404:
        return {
          title: "Not found",
          message: `${error.message} If someone sent you a link to a Study, ask one of its owners to invite you.`,
        };
      default:
        if (error.status >= 500) return { title: "The server had a problem", message: error.message, reload: true };
        return { title: "This page could not load", message: error.message, reload: true };
    }
  }
  if (error instanceof Error && /dynamically imported module|Importing a module script failed/i.test(error.message)) {
    return {
      title: "Stagewright has been updated",
      message: "Part of this page belongs to an older version. Reload the page to get the new one.",
      reload: true,
    };
  }
  return {
    title: "Something went wrong on this page",
    message: error instanceof Error ? error.message : "An unexpected error stopped this page.",
    reload: true,
  };
}

/** Route-level error boundary: a readable message inside the app frame, and a way on. */
export function RouteError() {
  const error = useRouteError();
  const location = useLocation();

  if (isApiError(error) && error.status === 401) {
    return <Navigate to={paths.signIn({ next: `${location.pathname}${location.search}` })} replace />;
  }
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundContent />;

  const { title, message, reload } = isRouteErrorResponse(error)
    ? { title: `${error.status} ${error.statusText}`, message: typeof error.data === "string" ? error.data : "", reload: true }
    : explain(error);

  return (
    <div role="alert" className="mx-auto max-w-xl space-y-4 py-10">
      <title>{`${title} · Stagewright`}</title>
      <h1 className="text-3xl font-bold">{title}</h1>
      {message && <p className="break-words">{message}</p>}
      <div className="flex flex-wrap gap-2">
        {reload && <Button onClick={() => window.location.reload()}>Reload the page</Button>}
        <Link to={paths.home()} className={buttonClasses("secondary")}>
          Go to the start page
        </Link>
      </div>
    </div>
  );
}

/** When even the session cannot load there is no app frame to show: a bare page. */
export function RootError() {
  const error = useRouteError();
  const { title, message } = explain(error);
  return (
    <main role="alert" className="mx-auto max-w-xl space-y-4 px-4 py-16">
      <title>{`${title} · Stagewright`}</title>
      <p className="text-xl font-bold">Stagewright</p>
      <h1 className="text-3xl font-bold">{title}</h1>
      <p className="break-words">{message}</p>
      <Button onClick={() => window.location.reload()}>Reload the page</Button>
    </main>
  );
}

export function AppLoading() {
  return (
    <p role="status" className="px-4 py-16 text-center text-ink/75">
      Loading Stagewright…
    </p>
  );
}
