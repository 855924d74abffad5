import { useLocation } from "react-router";
import { useCurrentUser } from "../api/session";
import { ButtonLink } from "../components/ui/button";
import { paths } from "./paths";

export function NotFoundContent() {
  const location = useLocation();
  const user = useCurrentUser();
  return (
    <div className="mx-auto max-w-xl space-y-4 py-10">
      <title>Page not found · Stagewright</title>
      <h1 className="text-3xl font-bold">Page not found</h1>
      <p>
        There is no page at <code className="rounded bg-ink/5 px-1 font-mono break-all">{location.pathname}</code>. The link may be
        mistyped or out of date.
      </p>
      <ButtonLink to={user ? paths.studies() : paths.signIn()}>{user ? "Go to your Studies" : "Go to sign in"}</ButtonLink>
    </div>
  );
}

/** The 404 page for any URL no route matches. */
export function NotFoundPage() {
  return <NotFoundContent />;
}
