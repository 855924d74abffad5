import { Link, NavLink, Outlet, useNavigation } from "react-router";
import { useMailOutboxAvailable } from "../api/mail";
import { useCurrentUser } from "../api/session";
import { SignOutButton } from "../features/auth/sign-out-button";
import { paths } from "./paths";

function Mark() {
  // Three stages and their arrows: growth in spruce, reproduction in clay and dashed.
  return (
    <svg viewBox="0 0 32 32" className="size-7" aria-hidden="true">
      <path d="M9 22 16 9l7 13" fill="none" stroke="#2f6b5a" strokeWidth="2.5" />
      <path d="M23 22H9" fill="none" stroke="#b5562f" strokeWidth="2.5" strokeDasharray="3 2" />
      <circle cx="16" cy="9" r="3.5" fill="#2f6b5a" />
      <circle cx="9" cy="22" r="3.5" fill="#2f6b5a" />
      <circle cx="23" cy="22" r="3.5" fill="#2f6b5a" />
    </svg>
  );
}

const navLinkClasses = ({ isActive }: { isActive: boolean }) =>
  `rounded-md px-3 py-1.5 font-bold ${isActive ? "bg-indigo/10 text-indigo underline decoration-2 underline-offset-4" : "text-ink hover:bg-ink/5"}`;

/** Top bar and page frame around every screen. */
export function AppShell() {
  const user = useCurrentUser();
  const mailOutbox = useMailOutboxAvailable();
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";

  return (
    <div className="flex min-h-screen flex-col">
      <a
        href="#main"
        className="sr-only rounded-md bg-indigo px-3 py-2 font-bold text-white focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50"
      >
        Skip to content
      </a>
      <header className="relative border-b border-ink/15 bg-white print:hidden">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2.5">
          <Link to={paths.home()} className="flex items-center gap-2 rounded-md text-xl font-bold tracking-tight">
            <Mark />
            Stagewright
          </Link>
          <nav aria-label="Main">
            <ul className="flex flex-wrap gap-1">
              {user && (
                <>
                  <li>
                    <NavLink to={paths.studies()} className={navLinkClasses}>
                      Studies
                    </NavLink>
                  </li>
                  <li>
                    <NavLink to={paths.settings()} className={navLinkClasses}>
                      Settings
                    </NavLink>
                  </li>
                </>
              )}
              <li>
                <NavLink to={paths.apiGuide()} className={navLinkClasses}>
                  API
                </NavLink>
              </li>
              {mailOutbox && (
                <li>
                  <NavLink to={paths.mailOutbox()} className={navLinkClasses}>
                    Mail outbox
                  </NavLink>
                </li>
              )}
            </ul>
          </nav>
          {user && (
            <div className="ml-auto flex items-center gap-3">
              <span className="text-sm">
                <span className="sr-only">Signed in as </span>
                <span className="font-bold">{user.name}</span>
              </span>
              <SignOutButton />
            </div>
          )}
        </div>
        {busy && (
          <div role="progressbar" aria-label="Loading page" className="absolute inset-x-0 bottom-0 h-0.5 overflow-hidden">
            <div className="h-full w-1/3 animate-pulse bg-indigo" />
          </div>
        )}
      </header>
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-6 focus:outline-none">
        <Outlet />
      </main>
    </div>
  );
}
