import { useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import { NavLink, Outlet, useNavigate, useNavigation } from "react-router-dom";
import { ROLE_LABELS } from "@calmcrest/contracts";
import { meQuery, signOut } from "../api/auth";
import { Logo } from "../components/logo";
import { navFor } from "../navigation";

/** The shell around every signed-in page: product name, the role's own navigation, who is signed in. */
export function AppLayout() {
  const { data: me } = useSuspenseQuery(meQuery);
  const queryClient = useQueryClient();
  const navigate = useNavigate();
  const navigation = useNavigation();
  if (!me) return null; // the loader redirects signed-out visitors before this renders

  const onSignOut = async () => {
    try {
      await signOut();
    } finally {
      queryClient.clear();
      await navigate("/sign-in", { replace: true });
    }
  };

  return (
    <div className="flex min-h-full flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-[2000] focus:rounded focus:bg-panel focus:px-3 focus:py-2">
        Skip to content
      </a>
      <header className="bg-night text-night-ink print:hidden">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3 sm:px-6">
          <NavLink to="/" className="flex items-center gap-2 font-semibold text-white">
            <Logo className="h-7 w-7" />
            Calmcrest
          </NavLink>
          <nav aria-label="Main" className="flex flex-wrap gap-1">
            {navFor(me.role).map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                className={({ isActive }) =>
                  `rounded-md px-3 py-1.5 text-sm font-semibold ${isActive ? "bg-white/15 text-white" : "text-night-ink hover:bg-white/10"}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto flex items-center gap-3 text-sm">
            <NavLink to="/account" title="Your account and e-mail settings" className="rounded-md px-1 hover:bg-white/10">
              <span className="font-semibold text-white underline-offset-2 hover:underline">{me.name}</span>
              <span className="text-night-ink"> · {ROLE_LABELS[me.role]}</span>
            </NavLink>
            <button type="button" onClick={onSignOut} className="rounded-md border border-white/30 px-3 py-1 font-semibold hover:bg-white/10">
              Sign out
            </button>
          </div>
        </div>
      </header>
      {/* Page loaders fetch before a page shows; this bar says something is on its way. */}
      <div aria-live="polite" className="relative h-1 bg-night print:hidden">
        {navigation.state === "loading" ? (
          <>
            <div role="progressbar" aria-label="Loading the page" className="h-1 w-1/3 animate-pulse bg-accent-pale" />
            {/* Also in words, beside the content that is about to change (the thin bar alone was easy to miss). */}
            <p className="absolute right-4 top-2 z-[1000] rounded-md bg-night px-3 py-1 text-sm font-semibold text-white shadow" data-testid="page-loading">
              Loading the page…
            </p>
          </>
        ) : null}
      </div>
      <main id="main" aria-busy={navigation.state === "loading" || undefined} className={`flex-1 transition-opacity ${navigation.state === "loading" ? "opacity-60" : ""}`}>
        <Outlet />
      </main>
      <footer className="border-t border-line px-4 py-3 text-center text-xs text-ink-soft print:hidden">
        Calmcrest reports seeing statistics; the choice of site rests with the site-selection committee.
      </footer>
    </div>
  );
}
