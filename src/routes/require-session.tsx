import { Navigate, Outlet, useLocation } from "react-router";
import { useSession } from "../api/session";
import { paths } from "./paths";

/**
 * Layout of every signed-in page. Without a session it sends the person to
 * sign-in; when the session ran out (rather than being signed out of), `next`
 * brings them back to this page afterwards.
 */
export function RequireSession() {
  const session = useSession();
  const location = useLocation();
  if (!session.user) {
    const next = session.endedBy === "sign-out" ? null : `${location.pathname}${location.search}${location.hash}`;
    return <Navigate to={paths.signIn({ next })} replace />;
  }
  return <Outlet />;
}
